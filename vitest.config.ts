/// <reference types="vitest/config" />
import { getViteConfig } from 'astro/config';

// Three projects so `npm test` can run them in order: pure units first (fast, no services),
// then integration (real MariaDB + SMTP fake), then browser (real Chromium against a built server).
export default getViteConfig({
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: 'unit',
          include: ['src/**/*.test.{ts,tsx}'],
          environment: 'node',
          // React island tests render recharts in jsdom: seconds each on a loaded 2-core machine.
          testTimeout: 20_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'integration',
          include: ['test/integration/**/*.test.ts'],
          environment: 'node',
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: 'browser',
          include: ['test/browser/**/*.test.ts'],
          environment: 'node',
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
      {
        extends: true,
        test: {
          // The short cluster drill: starts its own Galera cluster, HAProxy and app instances.
          name: 'cluster',
          include: ['test/cluster/**/*.test.ts'],
          environment: 'node',
          testTimeout: 15 * 60_000,
        },
      },
    ],
  },
});
