// Editor features over the protocol, on a netlist written here: every expected range
// is a place in that text, and every expected number comes from the SPICE3 user's
// manual (Quarles, 1989) or IEC 60062, named beside it.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CompletionItem, DocumentSymbol, Hover, Location, MarkupContent } from 'vscode-languageserver-protocol';
import { makeFolder, startServer, type TestClient } from './harness.js';

const BOARD = [
  'indicator board for the editor tests', // 0 title
  '.param rled=470', // 1
  '.model DRED D(IS=1e-20 N=1.9 RS=2)', // 2
  '.subckt CHAIN a k params: r=1k', // 3
  'R1 a m {r}', // 4
  'D1 m k DRED', // 5
  '.ends CHAIN', // 6
  'V1 in 0 DC 5', // 7
  'R2 in x 4k7', // 8
  'X1 x 0 CHAIN r={rled}', // 9
  'R3 in y 1M', // 10
  '.include parts.inc', // 11
  'D3 y 0 DAMBER', // 12
  '.end', // 13
  '',
].join('\n');
const PARTS = '* shared parts\n.model DAMBER D(IS=1e-19 N=2)\n';

function text(hover: Hover | null): string {
  return hover ? (hover.contents as MarkupContent).value : '';
}

describe('editor features', () => {
  let client: TestClient;
  const workspace = makeFolder({ 'board.cir': BOARD, 'parts.inc': PARTS });
  const uri = workspace.uri('board.cir');
  const at = (line: number, character: number) => ({ textDocument: { uri }, position: { line, character } });

  beforeAll(async () => {
    client = await startServer({ folders: [workspace.folder], settings: { debounceMilliseconds: 0 } });
    client.open(uri, BOARD);
    await client.diagnostics(uri);
  });
  afterAll(async () => {
    await client.stop();
    workspace.cleanup();
  });

  it('hover on a value gives its exact SPICE reading and the marking-code reading', async () => {
    const hover = await client.request<Hover | null>('textDocument/hover', at(8, 9));
    // SPICE3 user's manual (Quarles, 1989): k = 1e3, and letters after the scale factor are ignored, so 4k7 is 4 kΩ.
    expect(text(hover)).toContain('4 kΩ');
    // IEC 60062 resistor marking code: 4k7 = 4.7 kΩ.
    expect(text(hover)).toContain('4.7 kΩ');
    expect(hover?.range).toEqual({ start: { line: 8, character: 8 }, end: { line: 8, character: 11 } });
  });

  it('hover on 1M on a resistor says it is milli', async () => {
    // SPICE3 user's manual (Quarles, 1989): M = 1e-3, MEG = 1e6.
    const hover = text(await client.request<Hover | null>('textDocument/hover', at(10, 9)));
    expect(hover).toContain('1 mΩ');
    expect(hover).toContain('Meg');
  });

  it('hover on a model reference lists its parameters with meanings, from an include too', async () => {
    const local = text(await client.request<Hover | null>('textDocument/hover', at(5, 8)));
    expect(local).toContain('DRED');
    expect(local).toContain('saturation current'); // IS, SPICE3 user's manual diode model table
    expect(local).toContain('emission coefficient'); // N
    const included = text(await client.request<Hover | null>('textDocument/hover', at(12, 9)));
    expect(included).toContain('DAMBER');
    expect(included).toContain('parts.inc');
  });

  it('hover on a diode names its anode and cathode', async () => {
    const hover = text(await client.request<Hover | null>('textDocument/hover', at(12, 1)));
    expect(hover).toContain('anode `y`');
    expect(hover).toContain('cathode `0`');
  });

  it('hover on a subcircuit instance maps its ports and parameters', async () => {
    const hover = text(await client.request<Hover | null>('textDocument/hover', at(9, 1)));
    expect(hover).toContain('CHAIN');
    expect(hover).toMatch(/`a` \| `x`/);
    expect(hover).toMatch(/`k` \| `0`/);
    expect(hover).toContain('`r` = `{rled}`');
  });

  it('hover on a rule id or rating key in a directive explains it', async () => {
    client.change(uri, 10, [{ range: { start: { line: 13, character: 0 }, end: { line: 13, character: 0 } }, text: '*pnlint: ignore reversed-diode -- bench fixture\n*pnlint: rating D3 vrrm=50\n' }]);
    const rule = text(await client.request<Hover | null>('textDocument/hover', at(13, 20)));
    expect(rule).toContain('**reversed-diode**');
    // product.md's rating keys are datasheet symbols: vrrm is VRRM, the repetitive peak reverse voltage, in volts.
    const key = text(await client.request<Hover | null>('textDocument/hover', at(14, 20)));
    expect(key).toContain('VRRM');
    expect(key).toContain('(V)');
    client.change(uri, 11, [{ text: BOARD }]);
  });

  it('goes to the definitions of models, subcircuits, parameters and included files', async () => {
    const model = await client.request<Location[] | null>('textDocument/definition', at(5, 8));
    expect(model).toEqual([{ uri, range: { start: { line: 2, character: 7 }, end: { line: 2, character: 11 } } }]);
    const subckt = await client.request<Location[] | null>('textDocument/definition', at(9, 8));
    expect(subckt).toEqual([{ uri, range: { start: { line: 3, character: 8 }, end: { line: 3, character: 13 } } }]);
    const parameter = await client.request<Location[] | null>('textDocument/definition', at(9, 17));
    expect(parameter).toEqual([{ uri, range: { start: { line: 1, character: 7 }, end: { line: 1, character: 11 } } }]);
    const inSubckt = await client.request<Location[] | null>('textDocument/definition', at(4, 8));
    expect(inSubckt).toEqual([{ uri, range: { start: { line: 3, character: 26 }, end: { line: 3, character: 27 } } }]);
    const included = await client.request<Location[] | null>('textDocument/definition', at(12, 9));
    expect(included?.[0]?.uri).toBe(workspace.uri('parts.inc'));
    expect(included?.[0]?.range.start.line).toBe(1);
    const file = await client.request<Location[] | null>('textDocument/definition', at(11, 12));
    expect(file?.[0]?.uri).toBe(workspace.uri('parts.inc'));
  });

  it('outlines subcircuits with their contents, models and elements', async () => {
    const symbols = await client.request<DocumentSymbol[]>('textDocument/documentSymbol', { textDocument: { uri } });
    const names = symbols.map((s) => s.name);
    expect(names).toEqual(expect.arrayContaining(['rled', 'DRED', 'CHAIN', 'V1', 'R2', 'X1', 'R3', 'parts.inc', 'D3']));
    const chain = symbols.find((s) => s.name === 'CHAIN');
    expect(chain?.children?.map((c) => c.name)).toEqual(['R1', 'D1']);
    expect(chain?.range.start.line).toBe(3);
    expect(chain?.selectionRange).toEqual({ start: { line: 3, character: 8 }, end: { line: 3, character: 13 } });
  });

  it('completes model names where a diode takes one, subcircuits on X lines, dot commands, and directive words', async () => {
    const edited = BOARD.replace('.end\n', 'D4 in 0 \nX2 in 0 \n.\n*pnlint: ignore \n*pnlint: rating D3 \n.end\n');
    client.change(uri, 12, [{ text: edited }]);
    const labels = async (line: number, character: number) =>
      (await client.request<CompletionItem[]>('textDocument/completion', at(line, character))).map((item) => item.label);
    expect(await labels(13, 8)).toEqual(expect.arrayContaining(['DRED', 'DAMBER']));
    expect(await labels(14, 8)).toContain('CHAIN');
    expect(await labels(15, 1)).toEqual(expect.arrayContaining(['.model', '.subckt', '.include', '.param']));
    expect(await labels(16, 16)).toEqual(expect.arrayContaining(['reversed-diode', 'led-current-unlimited', 'zener-underbiased']));
    // product.md's rating keys
    expect(await labels(17, 19)).toEqual(expect.arrayContaining(['vrrm=', 'if=', 'ifsm=', 'pd=', 'vz=', 'izt=', 'izk=', 'izm=', 'kind=']));
    client.change(uri, 13, [{ text: BOARD }]);
  });
});
