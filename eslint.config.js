// Flat config: TypeScript rules without type information (fast, no tsconfig project), the React hooks rules,
// accessibility rules for JSX, and Prettier last so no rule argues with the formatter.
import js from "@eslint/js";
import prettier from "eslint-config-prettier";
import jsxA11y from "eslint-plugin-jsx-a11y";
import reactHooks from "eslint-plugin-react-hooks";
import globals from "globals";
import tseslint from "typescript-eslint";

export default tseslint.config(
  { ignores: ["build/", "node_modules/", ".react-router/", "db/data/", "tests/e2e/.screenshots/", "public/"] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    files: ["**/*.{ts,tsx,js,mjs}"],
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    rules: {
      // Unused arguments named _x are deliberate (route signatures, callbacks).
      "@typescript-eslint/no-unused-vars": [
        "error",
        { argsIgnorePattern: "^_", varsIgnorePattern: "^_", caughtErrors: "none" },
      ],
    },
  },
  {
    files: ["app/**/*.tsx"],
    plugins: { "react-hooks": reactHooks, "jsx-a11y": jsxA11y },
    rules: { ...reactHooks.configs.recommended.rules, ...jsxA11y.flatConfigs.recommended.rules },
  },
  {
    // Hooks kept in .ts modules (no JSX of their own) follow the same hooks rules.
    files: ["app/**/use-*.ts"],
    plugins: { "react-hooks": reactHooks },
    rules: reactHooks.configs.recommended.rules,
  },
  {
    // Tests read untyped JSON replies and build loose fixtures; strict typing there would only add casts.
    files: ["tests/**/*.ts"],
    rules: { "@typescript-eslint/no-explicit-any": "off" },
  },
  {
    // The fake payment provider and the FIT reader walk untyped nested data from outside (form bodies, a parser's
    // records) and check every value they use.
    files: ["app/.server/fakes/payments.ts", "app/lib/training/activity-fit.ts"],
    rules: { "@typescript-eslint/no-explicit-any": "off" },
  },
  prettier,
);
