import { reactRouter } from "@react-router/dev/vite";
import tailwindcss from "@tailwindcss/vite";
import { defineConfig } from "vite";

export default defineConfig({
  plugins: [tailwindcss(), reactRouter()],
  resolve: { tsconfigPaths: true },
  // Native and CommonJS server packages stay in node_modules; bundling them breaks their dynamic requires.
  ssr: {
    external: ["sequelize", "sqlite3", "bcryptjs", "nodemailer", "smtp-server", "mailparser", "stripe"],
  },
});
