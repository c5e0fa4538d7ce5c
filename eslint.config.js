// Lint rules that hold the house together (CONVENTIONS.md): import boundaries, no cycles,
// Knex and nodemailer only where they belong, no console in the server.
import { readdirSync } from "node:fs";
import tseslint from "typescript-eslint";
import { createNodeResolver, importX } from "eslint-plugin-import-x";

const features = readdirSync("src/features", { withFileTypes: true })
  .filter((d) => d.isDirectory())
  .map((d) => d.name);

// Server modules (decision 015): a module's repositories are imported by that module alone; the
// others, and the wiring in server/*.ts, call its service. The demo seed writes the whole scenario
// in one place and is exempt, as migrations are. tests/server/boundaries.test.ts checks the same
// rule in `npm test`, and that a table is named only in its owner's repository.
const serverModules = readdirSync("server", { withFileTypes: true })
  .filter((d) => d.isDirectory() && d.name !== "seed")
  .map((d) => d.name);
const repositoryZones = serverModules
  .filter((m) => readdirSync(`server/${m}`).some((f) => f.endsWith(".repository.ts")))
  .map((m) => ({
    target: ["./server/*.ts", ...serverModules.filter((o) => o !== m).map((o) => `./server/${o}/**`)],
    from: `./server/${m}/*.repository.ts`,
    message: `A repository is imported only by its own module: call server/${m}'s service instead (decision 015).`,
  }));

export default tseslint.config(
  { ignores: ["dist/**", "node_modules/**", ".data/**", "media/**", "tests/artifacts/**"] },
  ...tseslint.configs.recommended,
  {
    plugins: { "import-x": importX },
    settings: { "import-x/resolver-next": [createNodeResolver({ extensions: [".ts", ".tsx", ".js"] })] },
    rules: {
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_" }],
      "@typescript-eslint/no-non-null-assertion": "off",
      "import-x/no-cycle": ["error", { ignoreExternal: true }],
      "import-x/no-restricted-paths": [
        "error",
        {
          zones: [
            { target: "./src", from: "./server", message: "The browser app never imports server code." },
            { target: "./server", from: "./src", except: ["./shared"], message: "The server imports only src/shared from the client tree." },
            { target: "./src/shared", from: "./src", except: ["./shared"], message: "src/shared is isomorphic: it imports only src/shared." },
            { target: "./src/components", from: "./src/features", message: "UI primitives never depend on features." },
            { target: "./src/components", from: "./src/lib/api-client.ts", message: "UI primitives never fetch data." },
            ...features.map((f) => ({
              target: `./src/features/${f}`,
              from: "./src/features",
              except: [`./${f}`],
              message: "Features never import each other; compose them in src/app.",
            })),
            ...repositoryZones,
          ],
        },
      ],
    },
  },
  {
    files: ["src/shared/**"],
    rules: {
      "no-restricted-imports": ["error", { patterns: [{ regex: "^(?!zod$|\\.{1,2}/|#shared/).*", message: "src/shared imports only zod and src/shared." }] }],
      "no-restricted-syntax": [
        "error",
        { selector: "CallExpression[callee.object.name='Date'][callee.property.name='now']", message: "Pass `now` in; the domain has no clock." },
        { selector: "CallExpression[callee.object.name='Math'][callee.property.name='random']", message: "The domain is deterministic." },
        { selector: "NewExpression[callee.name='Date'][arguments.length=0]", message: "Pass `now` in; the domain has no clock." },
      ],
    },
  },
  {
    files: ["server/**"],
    rules: { "no-console": "error" },
  },
  {
    files: ["server/**"],
    ignores: ["server/**/*.repository.ts", "server/db/**", "server/seed/**"],
    rules: {
      "@typescript-eslint/no-restricted-imports": [
        "error",
        { paths: [{ name: "knex", message: "Knex belongs in repositories and migrations.", allowTypeImports: true }] },
      ],
    },
  },
  {
    files: ["server/**"],
    ignores: ["server/mail/**"],
    rules: {
      "@typescript-eslint/no-restricted-imports": [
        "error",
        {
          paths: [
            { name: "knex", message: "Knex belongs in repositories and migrations.", allowTypeImports: true },
            { name: "nodemailer", message: "nodemailer belongs in the mail module.", allowTypeImports: true },
          ],
        },
      ],
    },
  },
  {
    files: ["**/*.repository.ts", "server/db/**", "server/seed/**"],
    ignores: ["server/mail/**"],
    rules: {
      "@typescript-eslint/no-restricted-imports": ["error", { paths: [{ name: "nodemailer", message: "nodemailer belongs in the mail module." }] }],
    },
  },
);
