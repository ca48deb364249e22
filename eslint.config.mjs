import js from "@eslint/js";
import reactHooks from "eslint-plugin-react-hooks";
import tseslint from "typescript-eslint";

export default tseslint.config(
  {
    ignores: [
      ".next/**",
      ".next-test/**",
      "node_modules/**",
      "data/**",
      "test-results/**",
      "db/migrations/**",
      "next-env.d.ts",
    ],
  },
  js.configs.recommended,
  { files: ["**/*.mjs"], languageOptions: { globals: { process: "readonly", console: "readonly" } } },
  ...tseslint.configs.recommended,
  {
    files: ["**/*.{ts,tsx}"],
    plugins: { "react-hooks": reactHooks },
    rules: {
      ...reactHooks.configs.recommended.rules,
      // Only relevant to the React Compiler, which this project does not use (TanStack Table trips it).
      "react-hooks/incompatible-library": "off",
      "@typescript-eslint/no-unused-vars": [
        "error",
        { argsIgnorePattern: "^_", varsIgnorePattern: "^_", destructuredArrayIgnorePattern: "^_" },
      ],
    },
  },
  // lib/ is the pure domain: no database, gateway, simulator, app or Node I/O. The runtime that
  // does I/O lives in lib/server/.
  {
    files: ["lib/**/*.{ts,tsx}"],
    ignores: ["lib/server/**"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            {
              regex: "^(@/|(\\.\\./)+)(db|gateway|simulator|app|components)(/|$)",
              message: "lib/ outside lib/server/ is pure: no db, gateway, simulator, app or components imports.",
            },
            {
              regex: "^(@/|(\\.\\./)+)?lib/server(/|$)|^\\.\\./server(/|$)",
              message: "The pure domain does not reach into the runtime (lib/server).",
            },
            { regex: "^node:", message: "lib/ outside lib/server/ does no I/O: no node: modules." },
          ],
        },
      ],
    },
  },
  // Components take what they show from lib/ and each other; routes and pages hand them data.
  {
    files: ["components/**/*.{ts,tsx}"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            {
              regex: "^(@/|(\\.\\./)+)(app|db|gateway|simulator|lib/server)(/|$)",
              message: "components/ import from lib/ and components/ only, never the runtime in lib/server/.",
            },
          ],
        },
      ],
    },
  },
);
