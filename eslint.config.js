// ESLint (flat config): typescript-eslint's recommended rules, React hooks, and the import rules that hold the layers
// (DEVELOPERS.md, "Layers"): routes → services → db / domain; the domain imports no framework, ORM, node: module or
// service; routes never reach the database models; db/ never imports a service. `npm run lint` runs it; `npm test` too.
import js from "@eslint/js";
import reactHooks from "eslint-plugin-react-hooks";
import globals from "globals";
import tseslint from "typescript-eslint";

/** Node's built-in modules, with and without the node: prefix (the domain must run anywhere, the browser included). */
const BUILTINS = [
  "assert",
  "async_hooks",
  "buffer",
  "child_process",
  "cluster",
  "crypto",
  "dgram",
  "dns",
  "events",
  "fs",
  "fs/promises",
  "http",
  "http2",
  "https",
  "net",
  "os",
  "path",
  "perf_hooks",
  "process",
  "readline",
  "stream",
  "stream/promises",
  "timers",
  "tls",
  "url",
  "util",
  "v8",
  "vm",
  "worker_threads",
  "zlib",
];

const restrict = (groups, message) => ({ group: groups, message });

export default tseslint.config(
  {
    ignores: [
      "build/**",
      ".react-router/**",
      "node_modules/**",
      "public/**",
      "db/data/**",
      "search/data/**",
      "mail/data/**",
      "uploads/**",
      "tests/e2e/artifacts/**",
    ],
  },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node, ...globals.browser } },
    rules: {
      // The codebase's own conventions: `_name` for a value kept on purpose, `any` only where a library's types fall short.
      "@typescript-eslint/no-unused-vars": [
        "error",
        { argsIgnorePattern: "^_", varsIgnorePattern: "^_", caughtErrors: "none", destructuredArrayIgnorePattern: "^_" },
      ],
      "@typescript-eslint/no-explicit-any": "off",
      "@typescript-eslint/consistent-type-imports": ["error", { fixStyle: "inline-type-imports", disallowTypeAnnotations: false }],
    },
  },
  {
    files: ["app/**/*.tsx", "app/**/*.ts"],
    plugins: { "react-hooks": reactHooks },
    rules: { "react-hooks/rules-of-hooks": "error", "react-hooks/exhaustive-deps": "warn" },
  },
  // --- the layers ------------------------------------------------------------------------------------------------------
  {
    files: ["app/domain/**/*.ts", "app/domain/**/*.tsx"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          paths: BUILTINS.map((name) => ({ name, message: "app/domain is pure: no Node built-ins (it runs in the browser too)." })),
          patterns: [
            restrict(["node:*"], "app/domain is pure: no Node built-ins (it runs in the browser too)."),
            restrict(["react", "react-*", "react/*", "react-router", "react-router/*", "@react-router/*"], "app/domain is pure: no React or React Router."),
            restrict(
              ["sequelize", "sequelize/*", "sqlite3", "sharp", "nodemailer", "meilisearch", "express"],
              "app/domain is pure: no ORM, database driver or server library.",
            ),
            restrict(["~db/*", "**/db/*", "**/db/**"], "app/domain is pure: it never reads the database (services pass it rows)."),
            restrict(
              ["~/services/*", "**/services/*", "**/services/**", "*.server", "**/*.server", "*.server.ts", "**/*.server.ts"],
              "app/domain is pure: it never calls a service or server module.",
            ),
            restrict(["~/routes/*", "**/routes/*", "~/components/*", "**/components/*"], "app/domain does not know the pages."),
          ],
        },
      ],
    },
  },
  {
    files: ["app/routes/**/*.ts", "app/routes/**/*.tsx", "app/components/**/*.tsx", "app/components/**/*.ts", "app/root.tsx"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            restrict(
              ["~db/*", "**/db/*", "**/db/**", "sequelize", "sequelize/*", "sqlite3"],
              "Pages and components reach the database only through app/services.",
            ),
          ],
        },
      ],
    },
  },
  {
    files: ["db/**/*.ts"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            restrict(
              ["~/services/*", "**/app/services/*", "**/app/services/**", "**/services/*.server", "**/services/*.server.ts"],
              "db/ sits below the services: it never imports one (the CLI in app/cli.server.ts composes both).",
            ),
            restrict(["~/routes/*", "**/app/routes/*", "~/components/*", "**/app/components/*", "react", "react-router"], "db/ knows nothing of the pages."),
          ],
        },
      ],
    },
  },
  {
    files: ["app/infra/**/*.ts"],
    rules: {
      "no-restricted-imports": [
        "error",
        {
          patterns: [
            restrict(
              ["~/services/*", "**/services/*", "~db/*", "**/db/*", "~/routes/*", "**/routes/*"],
              "app/infra holds server primitives that know nothing of the app's data.",
            ),
          ],
        },
      ],
    },
  },
  {
    files: ["tests/**/*.ts", "tests/**/*.tsx", "search/**/*.ts", "mail/**/*.ts"],
    // A test's "let x = …" before a loop that reassigns it reads better than the rule's alternative.
    rules: { "@typescript-eslint/no-non-null-assertion": "off", "no-useless-assignment": "off" },
  },
);
