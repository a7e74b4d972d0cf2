// Include-aware checking over the protocol: a change to an included file (in the
// editor or on disk) re-checks the file that includes it; the editor's text of an
// include wins over the disk; an untrusted workspace reads no include outside it.
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { Diagnostic } from 'vscode-languageserver-protocol';
import { makeFolder, startServer, type TestClient } from './harness.js';

const MAIN = 'sensor node\n.include parts.inc\nV1 in 0 DC 3.3\nR1 in a 1k\nD1 a 0 DSIG\n.end\n';
const PARTS = '.model DSIG D(IS=2.5n N=1.8)\n';
// D1's model name on line 4, columns 7..11 of MAIN.
const MODEL_REFERENCE = { start: { line: 4, character: 7 }, end: { line: 4, character: 11 } };

const missingModel = (diagnostics: Diagnostic[]) => diagnostics.filter((d) => d.code === 'unknown-model');

describe('include-aware checking', () => {
  const clients: TestClient[] = [];
  const cleanups: (() => void)[] = [];
  afterAll(async () => {
    for (const client of clients) await client.stop();
    for (const cleanup of cleanups) cleanup();
  });

  it('re-checks the including file when the include changes in the editor, and again from disk when it is closed', async () => {
    const workspace = makeFolder({ 'main.cir': MAIN, 'parts.inc': PARTS });
    cleanups.push(workspace.cleanup);
    const client = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 } });
    clients.push(client);
    const main = workspace.uri('main.cir');
    const parts = workspace.uri('parts.inc');
    client.open(main, MAIN);
    expect(missingModel((await client.diagnostics(main)).diagnostics)).toEqual([]);

    client.open(parts, PARTS);
    await client.diagnostics(parts);
    let before = client.publishedFor(main).length;
    client.change(parts, 2, [{ range: { start: { line: 0, character: 7 }, end: { line: 0, character: 11 } }, text: 'DSIGX' }]);
    let [missing] = missingModel((await client.until(() => client.publishedFor(main).slice(before).find((p) => missingModel(p.diagnostics).length > 0), 'unknown-model in main')).diagnostics);
    expect(missing?.range).toEqual(MODEL_REFERENCE);

    // Closed: the disk's text, which still defines DSIG, governs again.
    before = client.publishedFor(main).length;
    client.closeDocument(parts);
    const again = await client.diagnostics(main, { after: before });
    expect(missingModel(again.diagnostics)).toEqual([]);

    // Changed on disk while closed.
    before = client.publishedFor(main).length;
    workspace.write('parts.inc', '.model DOTHER D\n');
    void client.connection.sendNotification('workspace/didChangeWatchedFiles', { changes: [{ uri: parts, type: 2 }] });
    [missing] = missingModel((await client.diagnostics(main, { after: before })).diagnostics);
    expect(missing?.range).toEqual(MODEL_REFERENCE);
  });

  it('checks an included file as a library: no title line, and the findings of the netlists that include it', async () => {
    // A subcircuit file whose first line is a definition, not a title; `.sub` is no library extension,
    // so it is known as a library only because main.cir includes it.
    const LAMP = '.subckt LAMP a k\nD1 a k DRED\n.ends LAMP\n.model DRED D(IS=1e-20 N=1.9 RS=2)\n';
    const PANEL = 'panel\n.include lamp.sub\nV1 in 0 DC 5\nX1 in 0 LAMP\n.end\n';
    const workspace = makeFolder({ 'lamp.sub': LAMP, 'panel.cir': PANEL });
    cleanups.push(workspace.cleanup);
    const client = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 } });
    clients.push(client);
    const lamp = workspace.uri('lamp.sub');
    client.open(lamp, LAMP);
    await client.diagnostics(lamp);
    client.open(workspace.uri('panel.cir'), PANEL);
    // The LED inside the subcircuit sits straight across V1: its finding lands on line 1 of lamp.sub.
    const settled = await client.until(() => {
      const last = client.publishedFor(lamp).at(-1);
      // Before panel.cir is checked, lamp.sub is read as a netlist whose title is `.subckt LAMP a k`, so `.ends` is a syntax error.
      return last && last.diagnostics.some((d) => d.code === 'led-current-unlimited') && !last.diagnostics.some((d) => d.code === 'syntax') ? last : undefined;
    }, 'the LED finding and no syntax error in lamp.sub');
    expect(settled.diagnostics.find((d) => d.code === 'led-current-unlimited')?.range.start).toEqual({ line: 1, character: 0 });
    // Its outline starts with the subcircuit on line 0, which a title line would have swallowed.
    const symbols = await client.request<{ name: string }[]>('textDocument/documentSymbol', { textDocument: { uri: lamp } });
    expect(symbols.map((s) => s.name)).toEqual(['LAMP', 'DRED']);
  });

  it('in a multi-root workspace, each file follows the pnlint.json at its own folder root', async () => {
    const first = makeFolder({ 'board.cir': MAIN.replace('.include parts.inc\n', '') });
    const second = makeFolder({ 'board.cir': MAIN.replace('.include parts.inc\n', '') });
    cleanups.push(first.cleanup, second.cleanup);
    const client = await startServer({ folders: [first.folder, second.folder], settings: { debounceMilliseconds: 0 } });
    clients.push(client);
    for (const folder of [first, second]) {
      client.open(folder.uri('board.cir'), MAIN.replace('.include parts.inc\n', ''));
      await client.diagnostics(folder.uri('board.cir'));
    }
    const secondBefore = client.publishedFor(second.uri('board.cir')).length;
    const configBefore = client.publishedFor(first.uri('pnlint.json')).length;
    // Not JSON: the first folder's file is re-checked and the mistake is shown in pnlint.json itself.
    first.write('pnlint.json', '{ "ratings": ');
    void client.connection.sendNotification('workspace/didChangeWatchedFiles', { changes: [{ uri: first.uri('pnlint.json'), type: 1 }] });
    const config = await client.diagnostics(first.uri('pnlint.json'), { after: configBefore });
    expect(config.diagnostics.map((d) => d.code)).toEqual(['directive']);
    await new Promise((resolve) => setTimeout(resolve, 300));
    expect(client.publishedFor(second.uri('board.cir')).length).toBe(secondBefore);
  });

  it('in an untrusted workspace reads no include outside the workspace folders', async () => {
    const outside = mkdtempSync(join(tmpdir(), 'pnlint-outside-'));
    cleanups.push(() => rmSync(outside, { recursive: true, force: true }));
    writeFileSync(join(outside, 'parts.inc'), PARTS);
    const workspace = makeFolder({});
    cleanups.push(workspace.cleanup);
    const path = relative(workspace.folder, join(outside, 'parts.inc'));
    const text = MAIN.replace('parts.inc', path);

    const trusted = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 } });
    clients.push(trusted);
    trusted.open(workspace.uri('main.cir'), text);
    expect(missingModel((await trusted.diagnostics(workspace.uri('main.cir'))).diagnostics)).toEqual([]);

    const untrusted = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 }, initializationOptions: { restricted: true } });
    clients.push(untrusted);
    untrusted.open(workspace.uri('main.cir'), text);
    const { diagnostics } = await untrusted.diagnostics(workspace.uri('main.cir'));
    // The include line (line 1) says the file was not read, and D1's model is then unknown.
    expect(diagnostics.some((d) => d.range.start.line === 1 && d.severity === 1)).toBe(true);
    expect(missingModel(diagnostics)[0]?.range).toEqual(MODEL_REFERENCE);
  });
});
