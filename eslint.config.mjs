// Lint rules for the whole repository (ESLint flat config): typescript-eslint's recommended set,
// the React hooks rules, Next.js's own rules, and a 140-character line limit.
import js from "@eslint/js";
import nextPlugin from "@next/eslint-plugin-next";
import reactHooks from "eslint-plugin-react-hooks";
import tseslint from "typescript-eslint";

export default tseslint.config(
  { ignores: [".next/**", ".data/**", "node_modules/**", "db/migrations/**", "next-env.d.ts", "public/**", "test-results/**"] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    files: ["**/*.{ts,tsx,mjs,js}"],
    plugins: { "react-hooks": reactHooks, "@next/next": nextPlugin },
    rules: {
      ...reactHooks.configs.recommended.rules,
      ...nextPlugin.configs.recommended.rules,
      ...nextPlugin.configs["core-web-vitals"].rules,
      "max-len": ["error", { code: 140, ignoreUrls: true, ignoreRegExpLiterals: true }],
      // Unused names that start with _ are deliberate (a destructured field dropped, an unused argument).
      "@typescript-eslint/no-unused-vars": [
        "error",
        { argsIgnorePattern: "^_", varsIgnorePattern: "^_", destructuredArrayIgnorePattern: "^_", caughtErrors: "none" },
      ],
    },
  },
  {
    // Node scripts and configs.
    files: ["scripts/**/*.mjs", "*.mjs", "*.config.*"],
    languageOptions: {
      globals: {
        process: "readonly",
        console: "readonly",
        URL: "readonly",
        Buffer: "readonly",
        fetch: "readonly",
        setTimeout: "readonly",
        clearTimeout: "readonly",
      },
    },
  },
);
