import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

const root = fileURLToPath(new URL(".", import.meta.url));

// `npm test` (scripts/test.sh) starts PostgreSQL, the mail server and the app before vitest runs;
// the integration and e2e projects expect DATABASE_URL and BASE_URL from it.
export default defineConfig({
  resolve: {
    alias: [
      { find: /^@\//, replacement: root },
      // server-only throws outside a React Server Components bundle; tests import server modules directly.
      { find: /^server-only$/, replacement: `${root}tests/setup/empty-module.ts` },
    ],
  },
  test: {
    exclude: ["**/node_modules/**", "**/.next/**", "**/.data/**", "**/.git/**"],
    projects: [
      {
        extends: true,
        test: {
          name: "unit",
          environment: "node",
          include: ["lib/**/*.test.ts", "tests/gcode/**/*.test.ts"],
        },
      },
      {
        extends: true,
        test: {
          name: "integration",
          environment: "node",
          include: ["tests/integration/**/*.test.ts", "tests/infra/**/*.test.ts"],
          setupFiles: ["tests/setup/integration.ts"],
          testTimeout: 30_000,
          hookTimeout: 30_000,
          // The files share one database.
          fileParallelism: false,
        },
      },
      {
        extends: true,
        test: {
          name: "e2e",
          environment: "node",
          include: ["tests/e2e/**/*.e2e.test.ts"],
          testTimeout: 60_000,
          hookTimeout: 60_000,
          // One app and one browser at a time on two cores.
          fileParallelism: false,
        },
      },
    ],
  },
});
