// Bundles the CLI and the language server into single files (server/dist/bundle/),
// so that a start loads one file instead of hundreds of ES modules (Chevrotain's
// lodash-es alone is about 650). Run after `tsc -b`, by `npm run build`.
import { build } from 'esbuild';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const server = dirname(fileURLToPath(import.meta.url));
const out = join(server, 'dist/bundle');

const common = {
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  sourcemap: 'linked',
  logLevel: 'warning',
  legalComments: 'none',
  alias: { '@pnlint/grammar': join(server, '../grammar/src/index.ts') },
  // CommonJS dependencies inside an ES module bundle still call require() for Node's own modules.
  banner: { js: "import { createRequire as __pnlintCreateRequire } from 'node:module'; const require = __pnlintCreateRequire(import.meta.url);" },
};

await build({ ...common, entryPoints: [join(server, 'src/lsp/entry.ts')], outfile: join(out, 'lsp.mjs') });
await build({ ...common, entryPoints: [join(server, 'src/cli/main.ts')], outfile: join(out, 'pnlint.mjs') });
