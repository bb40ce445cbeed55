// ESLint flat config: typescript-eslint's recommended rules everywhere, the layering of src/
// (cli → report → analysis → model → spec → diagnostics) as import bans per folder, and short
// functions in src/. Layout is Prettier's job (.prettierrc.json), so no formatting rules here.
import comments from "@eslint-community/eslint-plugin-eslint-comments";
import js from "@eslint/js";
import globals from "globals";
import tseslint from "typescript-eslint";

/** A relative import that reaches into one of these top-level folders of src/. */
const intoFolders = (...folders) => `^\\.{1,2}/(?:\\.\\./)*(?:${folders.join("|")})(?:/|\\.js$|$)`;

/** no-restricted-imports for a folder of src/: which sibling folders and packages it may not use. */
function layer(files, { folders, packages = [], why }) {
  return {
    files,
    rules: {
      "no-restricted-imports": [
        "error",
        {
          paths: packages.map((name) => ({ name, message: why })),
          patterns: [{ regex: intoFolders(...folders), message: why }],
        },
      ],
    },
  };
}

/** Packages and Node modules that render, print or touch files and processes. */
const RENDERING_AND_IO = [
  "node:fs",
  "node:fs/promises",
  "fs",
  "fs/promises",
  "node:child_process",
  "child_process",
  "vega",
  "vega-lite",
  "handlebars",
  "puppeteer-core",
];

export default tseslint.config(
  { ignores: ["dist/", "node_modules/", "out/", "scratch/", "schema/", "templates/"] },
  js.configs.recommended,
  ...tseslint.configs.recommended,
  {
    languageOptions: { globals: { ...globals.node } },
    linterOptions: { reportUnusedDisableDirectives: "error" },
    plugins: { "@eslint-community/eslint-comments": comments },
    rules: {
      // a disable comment must say why: `// eslint-disable-next-line rule -- reason`
      "@eslint-community/eslint-comments/require-description": ["error", { ignore: [] }],
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
    },
  },
  {
    files: ["src/**/*.ts"],
    rules: {
      "max-lines-per-function": ["error", { max: 80, skipBlankLines: true, skipComments: true, IIFEs: true }],
      // generated code is compiled in three places only, each with a disable comment saying why
      "no-new-func": "error",
    },
  },
  layer(["src/analysis/**/*.ts"], {
    folders: ["report", "cli"],
    packages: RENDERING_AND_IO,
    why: "analysis/ is pure: it returns data and never renders, prints or touches files (DEVELOPERS.md)",
  }),
  layer(["src/model/**/*.ts"], {
    folders: ["analysis", "report", "cli"],
    why: "model/ sits below analysis/, report/ and cli/ (DEVELOPERS.md, architecture map)",
  }),
  layer(["src/spec/**/*.ts"], {
    folders: ["model", "analysis", "report", "cli"],
    why: "spec/ sits below model/, analysis/, report/ and cli/ (DEVELOPERS.md, architecture map)",
  }),
  layer(["src/report/**/*.ts"], {
    folders: ["cli"],
    why: "report/ is used by cli/, never the other way round (DEVELOPERS.md, architecture map)",
  }),
  {
    files: ["tests/**/*.ts"],
    rules: {
      // a test states its expectation with expect(); a non-null assertion after a find() that
      // the test has just checked is the clearest way to say "this exists"
      "@typescript-eslint/no-non-null-assertion": "off",
      "no-console": ["error", { allow: ["info", "warn"] }],
    },
  },
);
