// The runner without a worker (for embedders that give no worker script): the same two
// phases in the protocol thread, the findings first, then the same findings with their
// verified fixes; a cancelled run builds none. Runs in-process, from the sources.
import { describe, expect, it } from 'vitest';
import { CancellationTokenSource } from 'vscode-languageserver';
import { InlineRunner, type RunRequest } from '../../server/src/lsp/runner.js';
import { DEFAULT_SETTINGS } from '../../server/src/settings.js';

/** An invented lamp: an LED across a 5 V rail with nothing to limit its current. */
const BARE_LED = 'bench lamp\nV1 in 0 DC 5\nD1 in 0 DRED\n.model DRED D(IS=1e-20 N=1.9 RS=2)\n.end\n';

function request(text: string): RunRequest {
  const uri = 'untitled:lamp.cir';
  return { uri, text, settings: DEFAULT_SETTINGS, config: undefined, workspaceRoot: undefined, folders: [], openDocuments: [{ uri, version: 1, text }] };
}

describe('the in-thread runner', () => {
  it('answers with the findings first, then the same findings with their fixes', async () => {
    const runner = new InlineRunner(() => {});
    const run = runner.run(request(BARE_LED), new CancellationTokenSource().token);
    const first = await run.diagnostics;
    const fixed = await run.fixes;
    // Common practice, no source: an LED needs a series current limit.
    const unlimited = first.findings.findIndex((finding) => finding.rule === 'led-current-unlimited');
    expect(unlimited).toBeGreaterThanOrEqual(0);
    expect(first.findings[unlimited]!.fixes).toEqual([]);
    expect(fixed?.findings.map((finding) => finding.rule)).toEqual(first.findings.map((finding) => finding.rule));
    const preferred = fixed!.findings[unlimited]!.fixes.filter((fix) => fix.preferred);
    expect(preferred).toHaveLength(1);
    // The fix inserts a resistor line (product.md: "insert a series resistor").
    expect(preferred[0]!.edits.some((edit) => /^R\S*\s/im.test(edit.newText))).toBe(true);
    expect((await run.diodes)?.map((report) => report.element)).toEqual(['D1']);
  });

  it('builds no fixes for a run cancelled after its findings', async () => {
    const runner = new InlineRunner(() => {});
    const source = new CancellationTokenSource();
    const run = runner.run(request(BARE_LED), source.token);
    await run.diagnostics;
    source.cancel();
    expect(await run.fixes).toBeUndefined();
  });
});
