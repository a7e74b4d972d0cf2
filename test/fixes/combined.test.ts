// "Fix all": the preferred fixes of a file applied together are offered only as far as a
// re-check of the combination passes them. Expected numbers from ngspice 39 on the netlists
// as the fixes leave them; the ratings are the directives' own.
import { describe, expect, it } from 'vitest';
import { analyze, withVerifiedFixes } from '../../server/src/analysis.js';
import { applyEdits } from '../../server/src/edits.js';
import { declareNgspiceGate } from '../support/ngspice.js';
import { MAIN_URI, memoryReader, ngspiceValue, ZENER_PANEL as PANEL } from './support.js';

const ngspiceRuns = declareNgspiceGate();

/** Analysis with verified fixes, as the language server's second phase makes it. */
function fixAllOf(text: string) {
  const input = { uri: MAIN_URI, text, files: memoryReader({ [MAIN_URI]: text }) };
  const fixed = withVerifiedFixes(analyze({ ...input, withoutFixes: true }), input);
  return { fixed, fixAll: fixed.fixAll! };
}

/** The zener's dissipation at the 12.6 V corner (12 V + the default 5 %), from ngspice 39: VZ · IZ. */
function zenerDissipation(netlist: string): number {
  const high = netlist.replace('VIN in 0 DC 12\n', 'VIN in 0 DC 12.6\n');
  expect(high).not.toBe(netlist);
  return ngspiceValue(high, 'v(z)') * -ngspiceValue(high, '@dz[id]');
}



describe.runIf(ngspiceRuns)('fix all', () => {
  it('leaves out a fix that is right alone but wrong together with the others', () => {
    const { fixed, fixAll } = fixAllOf(PANEL);
    const preferred = fixed.findings.flatMap((finding) => finding.fixes.filter((fix) => fix.preferred));
    expect(preferred).toHaveLength(2); // one resistor fix per LED, each verified alone
    expect(fixAll.titles).toEqual([preferred[0]!.title]);
    expect(fixAll.withheld).toBe(1);

    const bothEdits = preferred.flatMap((fix) => fix.edits);
    const both = applyEdits(PANEL, bothEdits)!;
    const offered = applyEdits(PANEL, fixAll.edits)!;
    // ngspice 39: both resistor fixes together put the zener over its 200 mW rating; the one offered keeps it well under.
    expect(zenerDissipation(both)).toBeGreaterThan(0.2);
    expect(zenerDissipation(offered)).toBeLessThan(0.2);
  });

  it('offers every preferred fix when they pass together', () => {
    // Two LEDs on a plain 5 V rail, each through a resistor far too small: independent of each other.
    const text = [
      'two indicators on a 5 V rail',
      'V5 v5 0 DC 5',
      'R1 v5 a1 10',
      'D1 a1 0 DLED',
      'R2 v5 a2 10',
      'D2 a2 0 DLED',
      '*pnlint: rating DLED kind=led if=20m',
      '.model DLED D(IS=1e-20 N=1.8 RS=2.5)',
      '.end',
      '',
    ].join('\n');
    const { fixed, fixAll } = fixAllOf(text);
    const preferred = fixed.findings.flatMap((finding) => finding.fixes.filter((fix) => fix.preferred));
    expect(preferred).toHaveLength(2);
    expect(fixAll.titles).toEqual(preferred.map((fix) => fix.title));
    expect(fixAll.withheld).toBe(0);
    // ngspice 39 at 5.25 V (5 V + 5 %): both LEDs now under their 20 mA rating.
    const high = applyEdits(text, fixAll.edits)!.replace('V5 v5 0 DC 5\n', 'V5 v5 0 DC 5.25\n');
    expect(high).toContain('DC 5.25');
    for (const diode of ['d1', 'd2']) expect(ngspiceValue(high, `@${diode}[id]`)).toBeLessThan(0.02);
  });
});
