// `pnlint lsp --stdio`: the same language server the extension starts, for any LSP editor.
// createConnection() in the entry reads `--stdio` (or `--node-ipc`) from the command line.
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

export async function startStandaloneServer(): Promise<void> {
  if (!process.argv.includes('--stdio') && !process.argv.includes('--node-ipc')) process.argv.push('--stdio');
  // The bundled server starts several times faster; the module-by-module build is the fallback.
  const bundled = new URL('../bundle/lsp.mjs', import.meta.url);
  const entry = existsSync(fileURLToPath(bundled)) ? bundled.href : new URL('../lsp/entry.js', import.meta.url).href;
  await import(entry);
}
