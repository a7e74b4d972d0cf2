// What the editor shows of a solved diode: the hover's kind, ratings and operating
// point at each corner, the inlay hint at nominal, and an ignore directive that
// silences exactly the finding it names. Numbers from ngspice 39 on the same circuit.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CodeAction, Diagnostic, Hover, InlayHint, MarkupContent, TextDocumentEdit } from 'vscode-languageserver-protocol';
import { applyLspEdits, makeFolder, startServer, type TestClient } from './harness.js';

// An indicator LED on a 5 V rail through 330 Ω.
const INDICATOR = 'status indicator\nV1 in 0 DC 5\nR1 in a 330\nD1 a 0 DRED\n.model DRED D(IS=1e-20 N=1.9 RS=2)\n.end\n';
// The same LED straight across the rail, indented: nothing limits its current.
const UNLIMITED = 'panel lamp\nV1 in 0 DC 5\n  D1 in 0 DRED\n.model DRED D(IS=1e-20 N=1.9 RS=2)\n.end\n';

describe('diodes in the editor', () => {
  let client: TestClient;
  const workspace = makeFolder({});

  beforeAll(async () => {
    client = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 } });
  });
  afterAll(async () => {
    await client.stop();
    workspace.cleanup();
  });

  it('hover on a diode shows its kind, ratings with sources, and the operating point at each corner', async () => {
    const uri = workspace.uri('indicator.cir');
    client.open(uri, INDICATOR);
    await client.diagnostics(uri);
    const hover = await client.request<Hover | null>('textDocument/hover', { textDocument: { uri }, position: { line: 3, character: 1 } });
    const text = (hover?.contents as MarkupContent | undefined)?.value ?? '';
    expect(text).toContain('LED');
    // product.md: an LED with no rating gets the rule of thumb, 20 mA continuous and 5 V reverse (common practice, no source).
    expect(text).toContain('IF 20 mA (rule of thumb for LEDs)');
    expect(text).toContain('VRRM 5 V (rule of thumb for LEDs)');
    // ngspice 39, nominal: v(a) = 2.049208 V, i(D1) = 8.941794 mA; 8.941794 mA / 20 mA = 44.7 %.
    expect(text).toMatch(/\| at nominal values \| 2\.05 V \| 8\.94 mA \|.*IF 44\.7 %/);
    // ngspice 39 with V1 = 5.25 V (the 5 % default supply tolerance, common practice): 2.054604 V, 9.683018 mA.
    expect(text).toMatch(/5\.25 V.*\| 2\.05 V \| 9\.68 mA \|/);
  });

  it('shows the nominal current and voltage as an inlay hint at the end of the diode line', async () => {
    const uri = workspace.uri('indicator.cir');
    const hints = await client.request<InlayHint[]>('textDocument/inlayHint', {
      textDocument: { uri },
      range: { start: { line: 0, character: 0 }, end: { line: 6, character: 0 } },
    });
    expect(hints).toHaveLength(1);
    // End of `D1 a 0 DRED` on line 3; values from ngspice 39 as above.
    expect(hints[0]!.position).toEqual({ line: 3, character: 11 });
    expect(hints[0]!.label).toBe('8.94 mA, 2.05 V');
  });

  it('the operating-point request returns the report with the solved diode', async () => {
    const text = await client.request<string>('pnlint/operatingPoint', { uri: workspace.uri('indicator.cir') });
    // ngspice 39, nominal: i(D1) = 8.941794 mA, v(a) = 2.049208 V.
    expect(text).toContain('8.94 mA');
    expect(text).toContain('2.05 V');
    expect(text).toContain('D1');
  });

  it('an ignore action above the element line, with its indentation, silences that rule only', async () => {
    const uri = workspace.uri('lamp.cir');
    client.open(uri, UNLIMITED);
    const { diagnostics } = await client.diagnostics(uri);
    const unlimited = diagnostics.find((d: Diagnostic) => d.code === 'led-current-unlimited');
    expect(unlimited?.range.start).toEqual({ line: 2, character: 2 });
    expect(unlimited?.severity).toBe(1);
    // Its related location is the source that drives it: V1 on line 1.
    expect(unlimited?.relatedInformation?.map((r) => [r.location.uri, r.location.range.start.line])).toEqual([[uri, 1]]);
    const actions = await client.request<CodeAction[]>('textDocument/codeAction', {
      textDocument: { uri },
      range: unlimited!.range,
      context: { diagnostics: [unlimited] },
    });
    // One ignore for the element's line (the pipeline's verified one), beside the whole-file one: never two.
    const lineIgnores = actions.filter((a) => a.title.startsWith('Ignore ') && !a.title.includes('whole file'));
    expect(lineIgnores.map((a) => a.title)).toEqual(['Ignore led-current-unlimited for D1 (add a pnlint directive above its line)']);
    const edit = lineIgnores[0]!.edit!.documentChanges![0] as TextDocumentEdit;
    const edited = applyLspEdits(UNLIMITED, edit.edits);
    // product.md: `*pnlint: ignore <rule> -- reason` applies to the next element line.
    expect(edited).toBe('panel lamp\nV1 in 0 DC 5\n  *pnlint: ignore led-current-unlimited -- \n  D1 in 0 DRED\n.model DRED D(IS=1e-20 N=1.9 RS=2)\n.end\n');
    const others = diagnostics.filter((d) => d.code !== 'led-current-unlimited').map((d) => d.code);

    const before = client.publishedFor(uri).length;
    client.change(uri, 2, edit.edits.map((e) => ({ range: e.range, text: e.newText })));
    const after = await client.diagnostics(uri, { after: before });
    expect(after.diagnostics.map((d) => d.code)).not.toContain('led-current-unlimited');
    expect(after.diagnostics.map((d) => d.code).sort()).toEqual(others.sort());
  });
});
