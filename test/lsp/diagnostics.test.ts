// Diagnostics and code actions over the protocol: ranges are places in the netlists
// written here; severities follow the settings; an ignore directive is inserted
// where product.md says it applies.
import { existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CodeAction, Diagnostic, TextDocumentEdit } from 'vscode-languageserver-protocol';
import { applyLspEdits, makeFolder, startServer, type TestClient } from './harness.js';

const RULE_PAGES = fileURLToPath(new URL('../../server/docs/rules/', import.meta.url));

// Line 1: the `(` at column 10 is never closed; line 2: a dot command no engine knows.
const BROKEN = 'bench supply\nV1 a 0 SIN(0 1 1k\n.frobnicate 3\nR1 a 0 1k\n.end\n';

describe('diagnostics and code actions', () => {
  let client: TestClient;
  const workspace = makeFolder({});
  const uri = workspace.uri('broken.cir');

  beforeAll(async () => {
    client = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 } });
  });
  afterAll(async () => {
    await client.stop();
    workspace.cleanup();
  });

  const byCode = (diagnostics: Diagnostic[], code: string) => diagnostics.filter((d) => d.code === code);

  it('reports a syntax error at its range with the rule id, source and the rule page when it exists', async () => {
    client.open(uri, BROKEN);
    const { diagnostics, version } = await client.diagnostics(uri);
    expect(version).toBe(1);
    const [syntax] = byCode(diagnostics, 'syntax');
    expect(syntax?.range).toEqual({ start: { line: 1, character: 10 }, end: { line: 1, character: 11 } });
    expect(syntax?.severity).toBe(1);
    expect(syntax?.source).toBe('pnlint');
    const page = `${RULE_PAGES}syntax.md`;
    expect(syntax?.codeDescription?.href).toBe(existsSync(page) ? pathToFileURL(page).href : undefined);
    const [unknown] = byCode(diagnostics, 'unknown-command');
    expect(unknown?.range.start).toEqual({ line: 2, character: 0 });
    expect(unknown?.severity).toBe(2);
  });

  it('offers ignore directives, but none for a syntax error', async () => {
    const { diagnostics } = client.publishedFor(uri).at(-1)!;
    const actions = await client.request<CodeAction[]>('textDocument/codeAction', {
      textDocument: { uri },
      range: { start: { line: 1, character: 0 }, end: { line: 2, character: 5 } },
      context: { diagnostics },
    });
    const unknown = byCode(diagnostics, 'unknown-command')[0]!;
    const forUnknown = actions.filter((a) => a.diagnostics?.[0]?.code === 'unknown-command');
    expect(actions.filter((a) => a.diagnostics?.[0]?.code === 'syntax')).toEqual([]);
    // A dot command is not an element line, so only the whole-file directive applies (product.md).
    expect(forUnknown.map((a) => a.kind)).toEqual(['quickfix']);
    const edit = forUnknown[0]!.edit!.documentChanges![0] as TextDocumentEdit;
    expect(edit.textDocument).toEqual({ uri, version: 1 });
    // Below the title line, which a SPICE engine reads as the title.
    expect(applyLspEdits(BROKEN, edit.edits)).toBe(`bench supply\n*pnlint: ignore-file unknown-command -- \n${BROKEN.split('\n').slice(1).join('\n')}`);
    expect(unknown.data).toBeDefined();
  });

  it('applies severity overrides from the settings, and hides a rule set to off', async () => {
    client.settings = { debounceMilliseconds: 0, severity: { 'unknown-command': 'error' } };
    let before = client.publishedFor(uri).length;
    void client.connection.sendNotification('workspace/didChangeConfiguration', { settings: { pnlint: client.settings } });
    let { diagnostics } = await client.diagnostics(uri, { after: before });
    expect(byCode(diagnostics, 'unknown-command')[0]?.severity).toBe(1);

    client.settings = { debounceMilliseconds: 0, severity: { 'unknown-command': 'off' } };
    before = client.publishedFor(uri).length;
    void client.connection.sendNotification('workspace/didChangeConfiguration', { settings: { pnlint: client.settings } });
    ({ diagnostics } = await client.diagnostics(uri, { after: before }));
    expect(byCode(diagnostics, 'unknown-command')).toEqual([]);
    expect(byCode(diagnostics, 'syntax')).toHaveLength(1);
  });

  it('clears a fixed error on the next edit and reports the counts in the status', async () => {
    const before = client.publishedFor(uri).length;
    // Close the parenthesis on line 1 (after `1k`, column 17).
    client.change(uri, 2, [{ range: { start: { line: 1, character: 17 }, end: { line: 1, character: 17 } }, text: ')' }]);
    const { diagnostics, version } = await client.diagnostics(uri, { after: before });
    expect(version).toBe(2);
    expect(byCode(diagnostics, 'syntax')).toEqual([]);
    const status = await client.until(() => client.statuses.find((s) => s.uri === uri && s.version === 2), 'status');
    expect(status.errors).toBe(diagnostics.filter((d) => d.severity === 1).length);
    expect(status.warnings).toBe(diagnostics.filter((d) => d.severity === 2).length);
  });

  it('offers no fix-all when no finding has a fix', async () => {
    const actions = await client.request<CodeAction[]>('textDocument/codeAction', {
      textDocument: { uri },
      range: { start: { line: 0, character: 0 }, end: { line: 4, character: 0 } },
      context: { diagnostics: [], only: ['source.fixAll.pnlint'] },
    });
    expect(actions).toEqual([]);
  });
});
