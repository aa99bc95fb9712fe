import { defineConfig } from 'vitest/config';

// Kept apart from vite.config.ts, whose root is client/ (see ../shared/STACK.md, gotcha 10).
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: 'unit',
          include: ['tests/shared/**/*.test.ts', 'tests/server/**/*.test.ts', 'tests/client/**/*.test.{ts,tsx}'],
          environment: 'node',
          testTimeout: 20_000,
        },
      },
      {
        test: {
          name: 'browser',
          include: ['tests/browser/**/*.test.ts'],
          environment: 'node',
          testTimeout: 90_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
