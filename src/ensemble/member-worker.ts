/**
 * A worker thread of an ensemble's pool: builds one member solver and
 * advances the members the main thread sends, one at a time, writing each
 * to the ensemble folder before it reports it done.
 */
import { parentPort, workerData } from "node:worker_threads";
import { MemberSolver, type MemberSetup } from "./member.js";
import { EnsembleStore } from "./store.js";
import type { ToWorker, FromWorker } from "./pool.js";

const port = parentPort;
if (!port) throw new Error("member-worker.js runs as a worker thread of an ensemble");
const data = workerData as { setup: MemberSetup; dir: string };
const post = (m: FromWorker): void => port.postMessage(m);
let solver: MemberSolver | undefined;
try {
  solver = new MemberSolver(data.setup);
  post({ kind: "ready" });
} catch (e) {
  post({ kind: "failed", index: null, message: e instanceof Error ? e.message : String(e) });
}
const store = EnsembleStore.read(data.dir);
port.on("message", (m: ToWorker) => {
  if (m.kind === "stop" || !solver) {
    solver?.close();
    port.close();
    return;
  }
  try {
    const fields = solver.evolveMember(m.index ?? undefined, (fraction) => post({ kind: "progress", index: m.index, fraction }));
    store.write(m.index ?? undefined, fields);
    post({ kind: "done", index: m.index });
  } catch (e) {
    post({ kind: "failed", index: m.index, message: e instanceof Error ? e.message : String(e) });
  }
});
