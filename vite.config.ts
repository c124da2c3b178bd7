import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vite";

export default defineConfig({
  plugins: [tailwindcss(), reactRouter()],
  resolve: { tsconfigPaths: true },
  // Server-only packages: keep the client dep optimizer from "discovering" them mid-run (reload breaks tests).
  optimizeDeps: {
    exclude: ["sequelize", "sqlite3", "umzug", "sharp", "bcryptjs", "remix-auth", "remix-auth-form",
      "@mjackson/form-data-parser", "meilisearch", "nodemailer", "sanitize-html", "tsx"],
  },
});
