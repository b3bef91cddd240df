// Lint for the browser glue (lampbook/assets) and the Node scripts the build and tests run.
import js from "@eslint/js";
import globals from "globals";

export default [
  { ignores: ["node_modules/**", "site/**", ".venv/**", ".cache/**", "build/**", "test-artifacts/**"] },
  js.configs.recommended,
  {
    files: ["lampbook/assets/**/*.js"],
    languageOptions: {
      ecmaVersion: 2022,
      sourceType: "module",
      // document$: the theme's page observable (instant navigation)
      globals: { ...globals.browser, document$: "readonly" },
    },
  },
  {
    files: ["lampbook/assets/sw.js"],
    languageOptions: { sourceType: "script", globals: { ...globals.serviceworker } },
  },
  {
    files: ["lampbook/assets/worker.js"],
    languageOptions: { globals: { ...globals.worker } },
  },
  {
    files: ["**/*.mjs"],
    languageOptions: { ecmaVersion: 2022, sourceType: "module", globals: { ...globals.node } },
  },
  {
    rules: {
      "no-unused-vars": ["error", { argsIgnorePattern: "^_", caughtErrors: "none" }],
      eqeqeq: ["error", "smart"],
      "prefer-const": "error",
      "no-var": "error",
    },
  },
];
