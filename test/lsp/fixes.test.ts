// Fixes as code actions: each finding's fixes as quick fixes with the preferred one
// marked, fix-all applying every preferred fix, and the findings gone after the edit.
// The circuit: a divider written with marking codes, which SPICE engines misread.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CodeAction, TextDocumentEdit } from 'vscode-languageserver-protocol';
import { applyLspEdits, makeFolder, startServer, type TestClient } from './harness.js';
import { ZENER_PANEL } from '../fixes/support.js';

const DIVIDER = 'sense divider\nV1 in 0 DC 5\nR1 in a 4k7\nR2 a 0 2k2\n.end\n';

describe('fixes as code actions', () => {
  let client: TestClient;
  const workspace = makeFolder({});
  const uri = workspace.uri('divider.cir');

  beforeAll(async () => {
    client = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 } });
    client.open(uri, DIVIDER);
    await client.diagnostics(uri);
  });
  afterAll(async () => {
    await client.stop();
    workspace.cleanup();
  });

  const apply = async (action: CodeAction, version: number) => {
    const change = action.edit!.documentChanges![0] as TextDocumentEdit;
    expect(change.textDocument.uri).toBe(uri);
    const before = client.publishedFor(uri).length;
    client.change(uri, version, change.edits.map((e) => ({ range: e.range, text: e.newText })));
    return { text: change.edits, published: await client.diagnostics(uri, { after: before, version }) };
  };

  it('offers the reading as a quick fix, preferred, and the finding goes once applied', async () => {
    const { diagnostics } = client.publishedFor(uri).at(-1)!;
    const r1 = diagnostics.find((d) => d.code === 'ambiguous-value' && d.range.start.line === 2)!;
    // `4k7` on line 2, columns 8..11.
    expect(r1.range).toEqual({ start: { line: 2, character: 8 }, end: { line: 2, character: 11 } });
    const actions = await client.request<CodeAction[]>('textDocument/codeAction', { textDocument: { uri }, range: r1.range, context: { diagnostics: [r1] } });
    const fixes = actions.filter((a) => a.kind === 'quickfix' && !a.title.startsWith('Ignore'));
    const preferred = fixes.filter((a) => a.isPreferred);
    expect(preferred).toHaveLength(1);
    const change = preferred[0]!.edit!.documentChanges![0] as TextDocumentEdit;
    // IEC 60062 marking code: 4k7 means 4.7 kΩ, which SPICE reads when written 4.7k (SPICE3 user's manual scale factors).
    expect(applyLspEdits(DIVIDER, change.edits)).toBe('sense divider\nV1 in 0 DC 5\nR1 in a 4.7k\nR2 a 0 2k2\n.end\n');
    const { published } = await apply(preferred[0]!, 2);
    expect(published.diagnostics.filter((d) => d.code === 'ambiguous-value').map((d) => d.range.start.line)).toEqual([3]);
  });

  it('fix-all applies every preferred fix, and nothing is left to fix', async () => {
    const actions = await client.request<CodeAction[]>('textDocument/codeAction', {
      textDocument: { uri },
      range: { start: { line: 0, character: 0 }, end: { line: 5, character: 0 } },
      context: { diagnostics: [], only: ['source.fixAll.pnlint'] },
    });
    expect(actions.map((a) => a.kind)).toEqual(['source.fixAll.pnlint']);
    const change = actions[0]!.edit!.documentChanges![0] as TextDocumentEdit;
    expect(applyLspEdits('sense divider\nV1 in 0 DC 5\nR1 in a 4.7k\nR2 a 0 2k2\n.end\n', change.edits)).toBe('sense divider\nV1 in 0 DC 5\nR1 in a 4.7k\nR2 a 0 2.2k\n.end\n');
    const { published } = await apply(actions[0]!, 3);
    expect(published.diagnostics.filter((d) => d.code === 'ambiguous-value')).toEqual([]);
    const after = await client.request<CodeAction[]>('textDocument/codeAction', {
      textDocument: { uri },
      range: { start: { line: 0, character: 0 }, end: { line: 5, character: 0 } },
      context: { diagnostics: [], only: ['source.fixAll.pnlint'] },
    });
    expect(after).toEqual([]);
  });

  it('offers no fix computed from an older text', async () => {
    // A long pause before checking, so that the code action below certainly comes before the re-check.
    client.settings = { debounceMilliseconds: 1_000 };
    const before = client.publishedFor(uri).length;
    void client.connection.sendNotification('workspace/didChangeConfiguration', { settings: { pnlint: client.settings } });
    await client.diagnostics(uri, { after: before });
    const { diagnostics } = client.publishedFor(uri).at(-1)!;
    // Edit without waiting for the re-check: the published diagnostics are now one version behind.
    client.change(uri, 4, [{ range: { start: { line: 3, character: 7 }, end: { line: 3, character: 11 } }, text: '3k3' }]);
    const stale = diagnostics.map((d) => ({ ...d }));
    const actions = await client.request<CodeAction[]>('textDocument/codeAction', {
      textDocument: { uri },
      range: { start: { line: 0, character: 0 }, end: { line: 5, character: 0 } },
      context: { diagnostics: stale },
    });
    // Until version 4 is checked, no quick fix, ignore directive or fix-all is built from version 3's findings.
    expect(client.publishedFor(uri).at(-1)!.version).toBe(3);
    expect(actions).toEqual([]);
    const fresh = await client.diagnostics(uri, { version: 4 });
    expect(fresh.diagnostics.find((d) => d.code === 'ambiguous-value')?.range).toEqual({ start: { line: 3, character: 7 }, end: { line: 3, character: 10 } });
  });
});

describe('fix all offers only what a re-check of the combination passes', () => {
  // Two LEDs on a zener-regulated rail (test/fixes/combined.test.ts has ngspice 39's numbers):
  // each resistor fix is right alone, but both together put the zener over its rating.
  const PANEL = ZENER_PANEL;
  let client: TestClient;
  const workspace = makeFolder({});
  const uri = workspace.uri('panel.cir');

  beforeAll(async () => {
    client = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 } });
    client.open(uri, PANEL);
    await client.diagnostics(uri);
  });
  afterAll(async () => {
    await client.stop();
    workspace.cleanup();
  });

  it('applies one of the two resistor fixes, not both', async () => {
    const { diagnostics } = client.publishedFor(uri).at(-1)!;
    expect(diagnostics.filter((d) => d.code === 'led-current-unlimited')).toHaveLength(2);
    const actions = await client.request<CodeAction[]>('textDocument/codeAction', {
      textDocument: { uri },
      range: { start: { line: 0, character: 0 }, end: { line: 12, character: 0 } },
      context: { diagnostics: [], only: ['source.fixAll.pnlint'] },
    });
    expect(actions.map((a) => a.title)).toEqual(['Apply all 1 preferred pnlint fix']);
    const change = actions[0]!.edit!.documentChanges![0] as TextDocumentEdit;
    const fixed = applyLspEdits(PANEL, change.edits).split('\n');
    expect(fixed[5]).not.toBe('R1 z a1 68');
    expect(fixed[7]).toBe('R2 z a2 68');
  });
});
