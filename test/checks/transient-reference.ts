// ngspice 39 transients as the reference for what a capacitor's held charge does: runs a
// netlist's `.tran` to steady state and reads the extremes of a few expressions over the
// settled window (verification.md: batch mode, markers around `print`, exit code not trusted).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readPrintedValues } from '../support/ngspice.js';

export interface TransientWindow {
  /** Time step (s). */
  step: number;
  /** The run ends here (s). */
  stop: number;
  /** Extremes are read from here to `stop` (s): after the capacitors have charged. */
  settledFrom: number;
}

/**
 * The largest value over the settled window of each expression (`v(mid)`, `v(out)-v(mid)`);
 * names map to expressions. The netlist's own `.tran` and `.end` lines are dropped.
 */
export function transientMaxima(netlist: string, expressions: Record<string, string>, window: TransientWindow): Map<string, number> {
  const circuit = netlist
    .split('\n')
    .filter((line) => !/^\s*\.(tran|end)\b/i.test(line))
    .join('\n');
  const names = Object.keys(expressions);
  const deck = [
    circuit,
    // Tighter than ngspice's default reltol 1e-3, so that the peaks are exact to far better than the comparisons.
    '.options reltol=1e-6',
    '.control',
    'set numdgt=15',
    `tran ${window.step} ${window.stop} ${window.settledFrom}`,
    ...names.map((name) => `let ${name} = vecmax(${expressions[name]})`),
    'echo @@BEGIN',
    `print ${names.join(' ')}`,
    'echo @@END',
    'quit',
    '.endc',
    '.end',
    '',
  ].join('\n');
  const folder = mkdtempSync(join(tmpdir(), 'pnlint-tran-'));
  try {
    const file = join(folder, 'deck.cir');
    writeFileSync(file, deck);
    const run = spawnSync('ngspice', ['-n', '-b', file], { encoding: 'utf8', env: { ...process.env, LC_ALL: 'C' }, timeout: 60_000 });
    const values = readPrintedValues(run.stdout ?? '');
    const failed = /simulation\(s\) aborted|^Error|fatal error/m.test(run.stderr ?? '');
    const result = new Map<string, number>();
    for (const name of names) {
      const value = values?.get(name.toLowerCase());
      if (failed || value === undefined) throw new Error(`ngspice transient gave no ${name}:\n${run.stdout}\n${run.stderr}\n${deck}`);
      result.set(name, value);
    }
    return result;
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}
