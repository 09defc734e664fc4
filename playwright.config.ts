import { defineConfig, devices } from '@playwright/test';

// End-to-end tests against the built app that docker-less-scripts/test.sh starts (BRINK_URL).
// The browser is Debian's Chromium; Playwright never downloads one here.
const chromiumArgs = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--disable-dev-shm-usage',
];

export default defineConfig({
  testDir: 'e2e',
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  retries: process.env.CI ? 1 : 0,
  reporter: [['list']],
  use: {
    baseURL: process.env.BRINK_URL ?? 'http://127.0.0.1:3000',
    trace: 'retain-on-failure',
    screenshot: 'only-on-failure',
    launchOptions: { executablePath: '/usr/bin/chromium', args: chromiumArgs },
  },
  projects: [
    { name: 'desktop', use: { ...devices['Desktop Chrome'], channel: undefined }, testIgnore: /field\..*spec\.ts/ },
    { name: 'phone', use: { ...devices['Pixel 7'], channel: undefined }, testMatch: /field\..*spec\.ts/ },
  ],
});
