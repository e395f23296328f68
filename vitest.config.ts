import os from "node:os";
import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/**/*.test.ts"],
    testTimeout: 120_000,
    hookTimeout: 120_000,
    pool: "forks",
    // one test file per core: most files wait on psibox child processes, HDF5 files and pictures, so vitest's
    // default of one fewer fork than cores leaves a 2-core machine half idle
    maxWorkers: Math.max(1, os.availableParallelism()),
  },
});
