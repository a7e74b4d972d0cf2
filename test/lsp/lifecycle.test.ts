// The server's life cycle over stdio: it publishes on open, debounces and cancels
// under rapid edits (only the last text's diagnostics arrive), re-checks a file when
// its pnlint.json changes, and survives any input.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeFolder, startServer, type TestClient } from './harness.js';

describe('language server life cycle', () => {
  let client: TestClient;
  const workspace = makeFolder({ 'board.cir': 'power board\nV1 in 0 DC 5\nR1 in 0 1k\n.end\n' });

  beforeAll(async () => {
    client = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 40 } });
  });
  afterAll(async () => {
    await client.stop();
    workspace.cleanup();
  });

  it('publishes diagnostics on open, with the version it checked, and a status notification after', async () => {
    const uri = workspace.uri('board.cir');
    client.open(uri, 'power board\nV1 in 0 DC 5\nR1 in 0 1k\n.end\n');
    const published = await client.diagnostics(uri);
    expect(published.version).toBe(1);
    const status = await client.until(() => client.statuses.find((s) => s.uri === uri), 'status');
    expect(status.errors).toBe(published.diagnostics.filter((d) => d.severity === 1).length);
    expect(status.milliseconds).toBeGreaterThanOrEqual(0);
  });

  it('under rapid edits publishes only the last version', async () => {
    const uri = workspace.uri('rapid.cir');
    client.open(uri, 'typing test\n');
    await client.diagnostics(uri, { version: 1 });
    const before = client.publishedFor(uri).length;
    // Twenty edits 5 ms apart, well inside the 40 ms debounce: only the last text may be checked.
    for (let version = 2; version <= 21; version++) {
      client.change(uri, version, [{ range: { start: { line: 1, character: 0 }, end: { line: 1, character: 0 } }, text: `R${version} a 0 1k\n` }]);
      await new Promise((resolve) => setTimeout(resolve, 5));
    }
    const last = await client.diagnostics(uri, { after: before, version: 21 });
    expect(last.version).toBe(21);
    // Give any stale check time to arrive, then make sure none did.
    await new Promise((resolve) => setTimeout(resolve, 300));
    expect(client.publishedFor(uri).slice(before).map((p) => p.version)).toEqual([21]);
  });

  it('re-checks an open file when its pnlint.json changes on disk', async () => {
    const uri = workspace.uri('board.cir');
    const before = client.publishedFor(uri).length;
    workspace.write('pnlint.json', '{}\n');
    void client.connection.sendNotification('workspace/didChangeWatchedFiles', { changes: [{ uri: workspace.uri('pnlint.json'), type: 1 }] });
    const again = await client.diagnostics(uri, { after: before });
    expect(again.uri).toBe(uri);
  });

  it('answers the operating-point request with text', async () => {
    const text = await client.request<string>('pnlint/operatingPoint', { uri: workspace.uri('board.cir') });
    expect(typeof text).toBe('string');
    expect(text.length).toBeGreaterThan(0);
  });

  it('survives garbage: binary bytes, a huge line, unbalanced everything, and requests anywhere in it', async () => {
    const garbage = [
      '\u0000\u0001\uffff\ud800 binary \u0007'.repeat(200),
      'X'.repeat(200_000),
      '.subckt .subckt .ends .ends ((((( {{{{ \'\'\' +++ \n+ + +\n.model\n.include\n.lib\n.if\n.control\nD\nR1 {',
      '\r\r\n\n\r*pnlint: rating kind= if= =\n*pnlint:\n; pnlint: ignore\n',
    ].join('\n');
    const uri = workspace.uri('garbage.cir');
    client.open(uri, garbage);
    const published = await client.diagnostics(uri);
    expect(Array.isArray(published.diagnostics)).toBe(true);
    for (const line of [0, 1, 2, 3, 5, 8]) {
      await client.request('textDocument/hover', { textDocument: { uri }, position: { line, character: 3 } });
      await client.request('textDocument/completion', { textDocument: { uri }, position: { line, character: 3 } });
      await client.request('textDocument/definition', { textDocument: { uri }, position: { line, character: 3 } });
    }
    await client.request('textDocument/documentSymbol', { textDocument: { uri } });
    await client.request('textDocument/codeAction', {
      textDocument: { uri },
      range: { start: { line: 0, character: 0 }, end: { line: 9, character: 0 } },
      context: { diagnostics: published.diagnostics, only: undefined },
    });
    // Requests about documents the server never saw, and at impossible positions.
    expect(await client.request('textDocument/hover', { textDocument: { uri: 'file:///nowhere.cir' }, position: { line: 0, character: 0 } })).toBeNull();
    await client.request('textDocument/hover', { textDocument: { uri }, position: { line: 10_000, character: 10_000 } });
    // Still alive and checking.
    const board = workspace.uri('board.cir');
    const before = client.publishedFor(board).length;
    client.change(board, 2, [{ range: { start: { line: 3, character: 0 }, end: { line: 3, character: 0 } }, text: 'R2 in 0 2k\n' }]);
    expect((await client.diagnostics(board, { after: before })).version).toBe(2);
    expect(client.process.exitCode).toBeNull();
  });
});
