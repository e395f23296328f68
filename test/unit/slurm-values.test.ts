// Slurm resource values: the accepted forms are those of sbatch's manual (options --time, --mem,
// --partition, --array throttle "%N"); anything else is refused with a one-line error naming the key.
import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";
import { checkCluster, checkMemory, checkPartition, checkTime, hexOf, jobName, UNHEX_FUNCTION } from "../../src/batch/slurm-values.js";

const base = { time: "01:00:00", cpus: 1, memory: "2G", max_parallel: 8 };

describe("Slurm values", () => {
  // sbatch(1), --time: "minutes", "minutes:seconds", "hours:minutes:seconds", "days-hours",
  // "days-hours:minutes" and "days-hours:minutes:seconds"
  it("accepts every time format sbatch documents", () => {
    for (const t of ["30", "30:15", "02:00:00", "1-12", "1-12:30", "1-12:30:05", "100:00:00"]) expect(checkTime(t)).toBe(t);
  });
  it("refuses times that are not Slurm's, zero, or out of range", () => {
    for (const t of ["", "0", "00:00:00", "1h", "2:60:00", "1-24", "1-1:1:60", "01:00:00\nrm -rf ~", "01:00:00 ", "$(id)"]) {
      expect(() => checkTime(t), t).toThrow(/^cluster\.time: must be a Slurm time limit/);
    }
  });
  // sbatch(1), --mem: "Default units are megabytes. Different units can be specified using the suffix [K|M|G|T]"
  it("accepts memory with Slurm's suffixes and refuses anything else", () => {
    for (const m of ["500", "500M", "4G", "1T", "64k"]) expect(checkMemory(m)).toBe(m);
    for (const m of ["0", "0G", "4 G", "4GB", "-1G", "4G\n#SBATCH --uid=0", ""]) expect(() => checkMemory(m), m).toThrow(/^cluster\.memory: /);
  });
  it("accepts partition lists and refuses text that could leave the #SBATCH line", () => {
    expect(checkPartition("debug")).toBe("debug");
    expect(checkPartition("gpu-a,cpu_b.2")).toBe("gpu-a,cpu_b.2");
    for (const p of ["", "debug\ntouch x", "a b", "a;b", "a,", "x".repeat(65)]) expect(() => checkPartition(p)).toThrow(/^cluster\.partition: /);
  });
  it("bounds the resource numbers", () => {
    expect(() => checkCluster({ ...base, max_parallel: 0 })).toThrow(/^cluster\.max_parallel: must be a whole number from 1 to 1000000; got 0$/);
    expect(() => checkCluster({ ...base, cpus: -1 })).toThrow(/^cluster\.cpus: must be a whole number from 1 to 100000; got -1$/);
    expect(() => checkCluster({ ...base, cpus: 1.5 })).toThrow(/^cluster\.cpus: /);
    expect(checkCluster({ ...base, partition: "debug" })).toEqual({ ...base, partition: "debug" });
  });
  it("echoes a refused value on one line, shortened", () => {
    let message = "";
    try {
      checkMemory(`4G\n${"x".repeat(10_000)}`);
    } catch (e) {
      message = (e as Error).message;
    }
    expect(message.split("\n")).toHaveLength(1);
    expect(message).toMatch(/got "4G\\nx{57}… \(10003 characters\)"$/);
  });
  it("makes job names of plain characters only", () => {
    expect(jobName("psibox-scan")).toBe("psibox-scan");
    expect(jobName("a b\nc$(id)")).toBe("a_b_c_id_");
    expect(jobName("x".repeat(100))).toHaveLength(64);
  });
  // computed independently: bash's own printf decodes the hex back to the original bytes
  it("decodes hex data back to the exact text in bash, with builtins only", () => {
    const text = "out put/$(touch pwned)\n'\"%a`x`/ünï";
    const r = spawnSync("bash", ["-c", `${UNHEX_FUNCTION}\nunhex ${hexOf(text)} V\nprintf '%s' "$V"`], { encoding: "utf8", env: { PATH: process.env["PATH"] ?? "" } });
    expect(r.status).toBe(0);
    expect(r.stdout).toBe(text);
  });
});
