import { defineConfig } from "@playwright/test";

// Chosen once in the main process; workers inherit it. Distinct per run so parallel runs never meet.
process.env.E2E_PORT ??= String(30000 + (process.pid % 20000));
process.env.E2E_SMTP_PORT ??= String(Number(process.env.E2E_PORT) + 1);
process.env.E2E_DB ??= `tauline_e2e_${process.env.E2E_PORT}`;
const port = Number(process.env.E2E_PORT);
const baseURL = `http://127.0.0.1:${port}`;

/** Browser tests: Debian's Chromium (never a downloaded browser) against the full stack on its own database. */
export default defineConfig({
  testDir: "tests/e2e",
  testMatch: "**/*.e2e.ts",
  outputDir: "tests/artifacts/playwright",
  timeout: 90_000,
  workers: 1,
  retries: 0,
  use: {
    baseURL,
    screenshot: "only-on-failure",
    trace: "off",
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
      args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    },
  },
  webServer: {
    command: "node --import tsx scripts/stack.ts",
    url: `${baseURL}/api/health`,
    timeout: 120_000,
    reuseExistingServer: false,
    stdout: "ignore",
    stderr: "pipe",
    env: {
      PG_DIR: process.env.TEST_PG_DIR ?? ".pg-test",
      PG_PORT: process.env.TEST_PG_PORT ?? "55433",
      PG_DB: process.env.E2E_DB,
      FRESH_DB: "1",
      KEEP_PG: "1",
      PORT: String(port),
      SMTP_PORT: process.env.E2E_SMTP_PORT,
      PUBLIC_URL: baseURL,
      DEMO: "1",
      // Browser tests create their own versions; the demo's generated series would only get in their way.
      DEMO_SERIES: "0",
      // The journeys sign the same demo people in many times a minute from one address; the limits
      // themselves are tested in tests/api/auth.test.ts.
      AUTH_RATE_LIMIT: "1000",
      AUTH_ACCOUNT_RATE_LIMIT: "1000",
      NODE_ENV: "test",
      LOG_LEVEL: "warn",
      STORAGE_DIR: `storage-e2e/${process.env.E2E_PORT}`,
    },
  },
});
