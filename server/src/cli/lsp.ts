// `pnlint lsp --stdio`: the same language server the extension starts, for any LSP editor.
// createConnection() in the entry reads `--stdio` (or `--node-ipc`) from the command line.
export async function startStandaloneServer(): Promise<void> {
  if (!process.argv.includes('--stdio') && !process.argv.includes('--node-ipc')) process.argv.push('--stdio');
  const entry = '../lsp/entry.js';
  await import(entry);
}
