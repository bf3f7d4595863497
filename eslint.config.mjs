import js from "@eslint/js";
import tseslint from "typescript-eslint";

export default tseslint.config(
  { ignores: ["node_modules/", "dist/", ".expo/", "data/", "drizzle/", "tests/artifacts/", "bench/out/", "**/*.d.ts"] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: {
      globals: {
        console: "readonly",
        process: "readonly",
        __dirname: "readonly",
        require: "readonly",
        module: "writable",
        fetch: "readonly",
        URL: "readonly",
      },
    },
    rules: {
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
      "@typescript-eslint/no-require-imports": "off",
      "@typescript-eslint/no-explicit-any": "error",
      "no-undef": "off",
    },
  },
  // Fixture JSON from reference libraries is read loosely in tests.
  { files: ["tests/**/*.ts", "bench/**/*.ts"], rules: { "@typescript-eslint/no-explicit-any": "off" } },
);
