import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vitest/config";

export default defineConfig({
  // The React Router plugin builds the app; vitest imports modules directly and does not need it.
  plugins: [tailwindcss(), !process.env.VITEST && reactRouter()],
  resolve: { tsconfigPaths: true },
  // Server-only packages: keep the client dep optimizer from "discovering" them mid-run (reload breaks tests).
  optimizeDeps: {
    exclude: [
      "sequelize",
      "sqlite3",
      "umzug",
      "sharp",
      "bcryptjs",
      "remix-auth",
      "remix-auth-form",
      "@mjackson/form-data-parser",
      "meilisearch",
      "nodemailer",
      "sanitize-html",
      "tsx",
    ],
  },
  // Three projects so CI output says which layer failed; integration and browser tests boot the production build.
  test: {
    projects: [
      { extends: true, test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node" } },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          testTimeout: 30_000,
          hookTimeout: 60_000,
          fileParallelism: false,
        },
      },
      {
        extends: true,
        test: { name: "e2e", include: ["tests/e2e/**/*.test.ts"], environment: "node", testTimeout: 60_000, hookTimeout: 120_000, fileParallelism: false },
      },
    ],
  },
});
