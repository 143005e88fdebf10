import { fileURLToPath } from "node:url";
import react from "@vitejs/plugin-react";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vitest/config";

const r = (p: string) => fileURLToPath(new URL(p, import.meta.url));

/** The API tests' own database, mail port and origin (scripts/test.sh starts the cluster; global setup does too). */
const testPgPort = process.env.TEST_PG_PORT ?? "55433";
// One database and mail port per test run, so runs in parallel (several engineers on one machine) never meet.
process.env.TEST_RUN_ID ??= String(process.pid);
const testEnv = {
  NODE_ENV: "test",
  DATABASE_URL: `postgres://postgres@127.0.0.1:${testPgPort}/tauline_api_${process.env.TEST_RUN_ID}`,
  SMTP_PORT: process.env.TEST_SMTP_PORT ?? String(20000 + (Number(process.env.TEST_RUN_ID) % 20000)),
  PUBLIC_URL: "http://127.0.0.1:3999",
  // Rate-limit counts are shared through the database by every test file's app (as by app servers in production),
  // so the suite lifts the per-client limits; the tests of the limits give their apps a scope of their own.
  AUTH_RATE_LIMIT: "1000",
  DOWNLOAD_RATE_LIMIT: "100000",
  STORAGE_DIR: "storage-test",
  LOG_LEVEL: "silent",
};

export default defineConfig({
  plugins: [react(), tailwindcss()],
  resolve: {
    alias: { "@/": r("./src/"), "@shared/": r("./shared/"), "@server/": r("./server/") },
  },
  server: { proxy: { "/api": "http://127.0.0.1:3000" } },
  // Nothing inlined as data: URLs (fonts would be refused by the CSP's font-src 'self').
  build: { chunkSizeWarningLimit: 1500, assetsInlineLimit: 0 },
  test: {
    projects: [
      {
        extends: true,
        // Property tests over thousands of chunk splits: give them room on a busy 2-core machine.
        test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node", testTimeout: 60_000 },
      },
      {
        extends: true,
        test: {
          name: "api",
          include: ["tests/api/**/*.test.ts"],
          environment: "node",
          fileParallelism: false,
          testTimeout: 60_000,
          hookTimeout: 60_000,
          globalSetup: ["tests/helpers/global-setup.ts"],
          env: testEnv,
        },
      },
    ],
  },
});
