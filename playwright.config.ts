import { defineConfig } from "@playwright/test";

// The test command (lib/cli/test.ts) builds and starts the app, its database
// and the local fakes, then runs this against E2E_BASE_URL in Debian's Chromium.
export default defineConfig({
  testDir: "./tests/e2e",
  fullyParallel: false,
  workers: 1,
  retries: 0,
  timeout: 60_000,
  expect: { timeout: 10_000 },
  outputDir: `.data/test-results${process.env.ZW_TEST_INSTANCE ? `-${process.env.ZW_TEST_INSTANCE}` : ""}/playwright`,
  use: {
    baseURL: process.env.E2E_BASE_URL ?? "http://localhost:3100",
    trace: "retain-on-failure",
    screenshot: "only-on-failure",
    launchOptions: {
      executablePath: "/usr/bin/chromium",
      args: [
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
      ],
    },
  },
});
