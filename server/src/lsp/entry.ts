// The language server process: the VS Code extension starts this file over IPC, and
// `pnlint lsp --stdio` over stdio; createConnection reads which from the command line.
import { createConnection, ProposedFeatures } from 'vscode-languageserver/node.js';
import { startLanguageServer } from './server.js';

startLanguageServer(createConnection(ProposedFeatures.all));
