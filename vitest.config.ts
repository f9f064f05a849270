import { defineConfig } from "vitest/config";

export default defineConfig({
  test: {
    include: ["test/**/*.test.ts"],
    fileParallelism: false,
    environment: "node",
    testTimeout: 120_000,
    hookTimeout: 60_000,
    pool: "forks",
    reporters: ["default", "./test/plain-summary.ts"],
  },
});
