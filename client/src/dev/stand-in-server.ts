// DEVELOPMENT ONLY, never shipped: a stand-in language server used to build the
// editor test harness before the real one (server/src/lsp/entry.ts) existed.
// It analyses nothing; it marks every diode line so that the harness has a
// squiggle, a hover and an ignore action to drive. esbuild.mjs bundles it only
// when PNLINT_STAND_IN_SERVER=1 is set.
import {
  CodeActionKind,
  DiagnosticSeverity,
  ProposedFeatures,
  TextDocumentSyncKind,
  TextDocuments,
  createConnection,
} from 'vscode-languageserver/node';
import { TextDocument } from 'vscode-languageserver-textdocument';

const connection = createConnection(ProposedFeatures.all);
const documents = new TextDocuments(TextDocument);

connection.onInitialize(() => ({
  capabilities: {
    textDocumentSync: TextDocumentSyncKind.Incremental,
    hoverProvider: true,
    codeActionProvider: { codeActionKinds: [CodeActionKind.QuickFix] },
  },
}));

documents.onDidChangeContent(({ document }) => {
  const lines = document.getText().split(/\r?\n/);
  const diagnostics = lines.flatMap((text, line) =>
    /^\s*d/i.test(text)
      ? [{ range: { start: { line, character: 0 }, end: { line, character: text.length } }, severity: DiagnosticSeverity.Error, code: 'stand-in', source: 'pnlint', message: 'stand-in server: diode line (no analysis)' }]
      : [],
  );
  void connection.sendDiagnostics({ uri: document.uri, diagnostics });
  void connection.sendNotification('pnlint/status', { uri: document.uri, errors: diagnostics.length, warnings: 0, milliseconds: 0 });
});

connection.onHover(({ textDocument, position }) => {
  const line = documents.get(textDocument.uri)?.getText().split(/\r?\n/)[position.line] ?? '';
  return /^\s*d/i.test(line) ? { contents: { kind: 'markdown', value: 'stand-in server: a diode' } } : null;
});

connection.onCodeAction(({ textDocument, context }) =>
  context.diagnostics.map((diagnostic) => ({
    title: `Ignore ${String(diagnostic.code)} here`,
    kind: CodeActionKind.QuickFix,
    diagnostics: [diagnostic],
    edit: { changes: { [textDocument.uri]: [{ range: { start: { line: diagnostic.range.start.line, character: 0 }, end: { line: diagnostic.range.start.line, character: 0 } }, newText: `*pnlint: ignore ${String(diagnostic.code)} -- \n` }] } },
  })),
);

connection.onRequest('pnlint/operatingPoint', () => 'stand-in server: no operating point');

documents.listen(connection);
connection.listen();
