// Bundles the extension and the language server into out/ (CommonJS, as VS Code
// loads extensions), and copies beside them the rule pages and the pnlint.json
// schema that the packaged extension ships.
import { build } from 'esbuild';
import { copyFileSync, existsSync, mkdirSync, readdirSync, rmSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const client = dirname(fileURLToPath(import.meta.url));
const root = join(client, '..');
const serverEntry = join(root, 'server/src/lsp/entry.ts');

// VS Code 1.82, the oldest release this extension supports, runs extensions on Node 18.
const common = {
  bundle: true,
  platform: 'node',
  format: 'cjs',
  target: 'node18',
  sourcemap: false,
  minify: true,
  logLevel: 'warning',
  legalComments: 'none',
};

await build({
  ...common,
  entryPoints: [join(client, 'src/extension.ts')],
  outfile: join(client, 'out/extension.js'),
  external: ['vscode'],
});

if (!existsSync(serverEntry)) {
  console.error(`esbuild.mjs: the language server entry ${serverEntry} is missing.`);
  process.exit(1);
}
await build({
  ...common,
  entryPoints: [serverEntry],
  outfile: join(client, 'out/server.js'),
  // The server is ESM in the repository; in a CommonJS bundle `import.meta` must
  // be rebuilt from the bundle's own location (it finds its rule pages from it).
  banner: { js: 'const __pnlintImportMetaUrl = require("node:url").pathToFileURL(__filename).href;' },
  define: {
    'import.meta.url': '__pnlintImportMetaUrl',
    'import.meta.dirname': '__dirname',
    'import.meta.filename': '__filename',
  },
  alias: { '@pnlint/grammar': join(root, 'grammar/src/index.ts') },
});

// Rule pages: the server links each diagnostic to <extension>/docs/rules/<id>.md.
const rulesFrom = join(root, 'server/docs/rules');
const rulesTo = join(client, 'docs/rules');
rmSync(join(client, 'docs'), { recursive: true, force: true });
mkdirSync(rulesTo, { recursive: true });
const pages = existsSync(rulesFrom) ? readdirSync(rulesFrom).filter((name) => name.endsWith('.md')) : [];
for (const page of pages) copyFileSync(join(rulesFrom, page), join(rulesTo, page));
if (pages.length === 0) console.warn(`esbuild.mjs: no rule pages in ${rulesFrom}; the rule links will not resolve.`);

// The pnlint.json schema: the checks' own (server/schemas) when it exists, else the extension's first version.
const schemaFrom = [join(root, 'server/schemas/pnlint.schema.json'), join(client, 'src/schemas/pnlint.schema.json')].find(existsSync);
mkdirSync(join(client, 'schemas'), { recursive: true });
copyFileSync(schemaFrom, join(client, 'schemas/pnlint.schema.json'));

// `npm run package` writes the .vsix into the repository's git-ignored cache.
mkdirSync(join(root, '.cache'), { recursive: true });
