// ESLint with the framework's own configuration (eslint-config-next: React, hooks, a11y, Next rules, TypeScript).
import nextVitals from "eslint-config-next/core-web-vitals";
import nextTs from "eslint-config-next/typescript";

const config = [
  ...nextVitals,
  ...nextTs,
  {
    rules: {
      // A leading underscore marks a value left out on purpose (a destructured field, an unused argument).
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_", destructuredArrayIgnorePattern: "^_", caughtErrors: "none" }],
    },
  },
  {
    // @react-pdf/renderer's Image draws into a PDF: it has no alt attribute to give.
    files: ["lib/certificates/render.tsx", "lib/dispatch/carton-label.tsx", "lib/labels/sheets.tsx"],
    rules: { "jsx-a11y/alt-text": "off" },
  },
  {
    ignores: [".next/**", "node_modules/**", ".tmp/**", "data/**", "db/migrations/**", "next-env.d.ts"],
  },
];

export default config;
