// ESLint flat config. The rule that matters most here is lapsebank/layers: the one-way import flow between
// the project's layers (DEVELOPERS.md "Layers"), checked on every file so it is a tool's job, not a reviewer's.
import tseslint from "typescript-eslint";
import { layersRule } from "./lib/lint/layers-rule.mjs";

export default [
  { ignores: ["node_modules/**", ".next/**", "lib/db/generated/**", "data/**", "coverage/**", "next-env.d.ts"] },
  {
    files: ["**/*.{ts,tsx,mts,mjs,js}"],
    languageOptions: { parser: tseslint.parser, ecmaVersion: "latest", sourceType: "module", parserOptions: { ecmaFeatures: { jsx: true } } },
    plugins: { lapsebank: { rules: { layers: layersRule } } },
    linterOptions: { reportUnusedDisableDirectives: "error" },
    rules: {
      "lapsebank/layers": "error",
      "no-debugger": "error",
      "no-var": "error",
      "prefer-const": "error",
      eqeqeq: ["error", "always", { null: "ignore" }],
    },
  },
];
