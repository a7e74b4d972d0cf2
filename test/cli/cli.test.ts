// The command line as a user runs it: the built `pnlint` (npm test builds first) in a child process, on files
// in a temporary folder. Expected values come from the netlists written here and the
// facts named beside each check, never from pnlint's own output.
import { describe, expect, it, beforeAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, chmodSync, existsSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createRequire } from 'node:module';
import Ajv from 'ajv-draft-04';
import addFormats from 'ajv-formats';

const root = fileURLToPath(new URL('../..', import.meta.url));
const launcher = join(root, 'server/bin/pnlint.js');

function pnlint(args: string[], cwd: string, env: Record<string, string> = {}) {
  const run = spawnSync(process.execPath, [launcher, ...args], { cwd, encoding: 'utf8', env: { ...process.env, ...env }, timeout: 60_000 });
  return { code: run.status, stdout: run.stdout, stderr: run.stderr };
}

// An LED straight across a 5 V rail: nothing limits its current (common practice, no source:
// an LED needs a series current limit). Line 3 is the LED.
const UNLIMITED_LED = ['status lamp straight on the rail', 'V1 vcc 0 DC 5', 'D1 vcc 0 DRED', '.model DRED D(IS=1e-20 N=1.7 RS=2)', '.end', ''].join('\n');
// The same LED through 470 Ω: about (5 − 1.9)/470 ≈ 6.6 mA, well inside 20 mA (rule of thumb for LEDs).
const LIMITED_LED = ['status lamp with its resistor', 'V1 vcc 0 DC 5', 'R1 vcc a 470', 'D1 a 0 DRED', '.model DRED D(IS=1e-20 N=1.7 RS=2)', '.end', ''].join('\n');

let folder: string;
beforeAll(() => {
  folder = mkdtempSync(join(tmpdir(), 'pnlint-cli-'));
  writeFileSync(join(folder, 'unlimited.cir'), UNLIMITED_LED);
  writeFileSync(join(folder, 'limited.cir'), LIMITED_LED);
  writeFileSync(join(folder, 'broken.cir'), 'title\nR1 a\n.model\n');
});

describe('pnlint check exit codes', () => {
  it('exits 0 on a clean file', () => {
    expect(pnlint(['check', 'limited.cir'], folder).code).toBe(0);
  });
  it('exits 1 when a finding is at error severity, and names the rule at the LED line', () => {
    const run = pnlint(['check', 'unlimited.cir'], folder, { NO_COLOR: '1' });
    expect(run.code).toBe(1);
    expect(run.stdout).toMatch(/^unlimited\.cir:3:1 error led-current-unlimited /m);
  });
  it('exits 2 on a usage error', () => {
    expect(pnlint(['check'], folder).code).toBe(2);
    expect(pnlint(['check', 'x.cir', '--format', 'xml'], folder).code).toBe(2);
    expect(pnlint(['frobnicate'], folder).code).toBe(2);
  });
  it('reports a file that cannot be read, still checks the others, and exits 2', () => {
    const run = pnlint(['check', 'missing.cir', 'unlimited.cir', '--format', 'json'], folder);
    expect(run.code).toBe(2);
    const report = JSON.parse(run.stdout);
    expect(report.files.map((f: { path: string }) => f.path)).toEqual(['missing.cir', 'unlimited.cir']);
    expect(report.files[0].error).toBeTruthy();
    expect(report.files[1].findings.some((f: { rule: string }) => f.rule === 'led-current-unlimited')).toBe(true);
  });
  it('expands globs, many files in one process', () => {
    const run = pnlint(['check', '*.cir', '--format', 'json'], folder);
    const paths = JSON.parse(run.stdout).files.map((f: { path: string }) => f.path);
    expect(paths).toEqual(expect.arrayContaining(['broken.cir', 'limited.cir', 'unlimited.cir']));
  });
  it('prints no colour when NO_COLOR is set or stdout is not a terminal', () => {
    expect(pnlint(['check', 'unlimited.cir'], folder).stdout).not.toContain('\x1b[');
  });
});

describe('pnlint check --format json', () => {
  it('has the stable version-1 shape with 1-based positions', () => {
    const report = JSON.parse(pnlint(['check', 'unlimited.cir', '--format', 'json'], folder).stdout);
    expect(report.version).toBe(1);
    const finding = report.files[0].findings.find((f: { rule: string }) => f.rule === 'led-current-unlimited');
    expect(finding.severity).toBe('error');
    expect(finding.element).toBe('D1');
    // Line 3 of the file, column 1: where `D1` is written.
    expect(finding.range.start).toEqual({ line: 3, column: 1 });
    expect(Array.isArray(finding.fixes)).toBe(true);
    for (const fix of finding.fixes) expect(Object.keys(fix).sort()).toEqual(['preferred', 'title']);
  });
  it('puts a syntax problem at its line', () => {
    const report = JSON.parse(pnlint(['check', 'broken.cir', '--format', 'json'], folder).stdout);
    const lines = report.files[0].findings.map((f: { range: { start: { line: number } } }) => f.range.start.line);
    expect(lines).toContain(2); // `R1 a` has one node where a resistor needs two (SPICE3 user's manual, element syntax)
  });
});

describe('pnlint check --format sarif', () => {
  it('is valid SARIF 2.1.0 against the published OASIS schema', () => {
    const require = createRequire(import.meta.url);
    const schema = JSON.parse(readFileSync(require.resolve('@microsoft/jest-sarif/lib/schemas/sarif-2.1.0-rtm.5.json'), 'utf8'));
    const ajv = new Ajv({ allErrors: true, strict: false, unicodeRegExp: false });
    addFormats(ajv);
    const validate = ajv.compile(schema);
    for (const file of ['unlimited.cir', 'broken.cir', 'missing.cir']) {
      const log = JSON.parse(pnlint(['check', file, '--format', 'sarif'], folder).stdout);
      const valid = validate(log);
      expect(validate.errors ?? [], file).toEqual([]);
      expect(valid).toBe(true);
    }
    const log = JSON.parse(pnlint(['check', 'unlimited.cir', '--format', 'sarif'], folder).stdout);
    const result = log.runs[0].results.find((r: { ruleId: string }) => r.ruleId === 'led-current-unlimited');
    expect(result.level).toBe('error');
    expect(result.locations[0].physicalLocation.region.startLine).toBe(3);
    expect(log.runs[0].tool.driver.rules[result.ruleIndex].id).toBe('led-current-unlimited');
  });
});

describe('pnlint check --fix', () => {
  it('applies the preferred fix atomically: the finding is gone and the file still parses', () => {
    const path = join(folder, 'to-fix.cir');
    writeFileSync(path, UNLIMITED_LED);
    chmodSync(path, 0o640);
    const run = pnlint(['check', 'to-fix.cir', '--fix', '--format', 'json'], folder);
    expect(run.code).toBe(0);
    const fixed = readFileSync(path, 'utf8');
    expect(fixed).not.toBe(UNLIMITED_LED);
    expect(fixed.split('\n').filter((line) => /^R/i.test(line))).toHaveLength(1); // one resistor inserted
    expect(JSON.parse(run.stdout).files[0].findings.filter((f: { severity: string }) => f.severity === 'error')).toEqual([]);
    // No temporary file left behind, and the mode kept.
    expect(readdirSync(folder).filter((name) => name.includes('.tmp'))).toEqual([]);
    expect(existsSync(path)).toBe(true);
  });
  it('keeps comments and the other lines exactly', () => {
    const path = join(folder, 'commented.cir');
    const text = UNLIMITED_LED.replace('D1 vcc 0 DRED', '* the lamp\nD1 vcc 0 DRED ; red, 20 mA part');
    writeFileSync(path, text);
    pnlint(['check', 'commented.cir', '--fix'], folder);
    const fixed = readFileSync(path, 'utf8');
    for (const line of text.split('\n').filter((l) => !l.startsWith('D1'))) expect(fixed.split('\n')).toContain(line);
    expect(fixed).toContain('; red, 20 mA part');
  });
});

describe('pnlint check --fix on a large board', () => {
  it('fixes every one of 120 LEDs on too small resistors in one run (more than the 50 rounds --fix may take)', () => {
    const lamps = 120;
    const lines = [`panel of ${lamps} indicators`, 'V1 vcc 0 DC 5'];
    for (let lamp = 1; lamp <= lamps; lamp++) lines.push(`R${lamp} vcc a${lamp} 10`, `D${lamp} a${lamp} 0 DRED`);
    const panel = [...lines, '.model DRED D(IS=1e-20 N=1.7 RS=2)', '.end', ''].join('\n');
    const path = join(folder, 'panel.cir');
    writeFileSync(path, panel);
    const run = pnlint(['check', 'panel.cir', '--fix', '--format', 'json'], folder);
    expect(run.code).toBe(0);
    expect(JSON.parse(run.stdout).files[0].findings.filter((f: { rule: string }) => f.rule === 'led-current-unlimited')).toEqual([]);
    // Every resistor re-valued (10 Ω on a 5 V rail is far too little for an LED: Ohm's law), no line added or lost.
    const fixed = readFileSync(path, 'utf8').split('\n');
    expect(fixed).toHaveLength(panel.split('\n').length);
    expect(fixed.filter((line) => /^R\d+ vcc a\d+ 10$/.test(line))).toEqual([]);
  });
});

describe('pnlint op', () => {
  it('prints every corner as JSON with node voltages, branch currents and diodes', () => {
    const run = pnlint(['op', 'limited.cir', '--format', 'json'], folder);
    expect(run.code).toBe(0);
    const report = JSON.parse(run.stdout);
    expect(report.corners.length).toBeGreaterThanOrEqual(3); // nominal, V1 low, V1 high (5 % default supply tolerance)
    const nominal = report.corners[0];
    expect(nominal.nodes.vcc).toBeCloseTo(5, 9); // the source sets it
    const diode = nominal.diodes.D1;
    // KVL and Ohm's law on the written circuit: the LED's current is the resistor's, (5 − Vf)/470.
    // Within the solver's convergence tolerance on currents (SPICE-like reltol 1e-3 on updates, so well under 1 nA here).
    expect(diode.current).toBeCloseTo((5 - diode.voltage) / 470, 8);
    // An LED's forward voltage is above 1.5 V (common practice, no source: red about 1.8–2.0 V).
    expect(diode.voltage).toBeGreaterThan(1.5);
    expect(diode.kind).toBe('led');
    expect(nominal.branches.R1).toBeCloseTo(diode.current, 8);
  });
  it('exits 2 for a file it cannot read', () => {
    expect(pnlint(['op', 'missing.cir'], folder).code).toBe(2);
  });
});

describe('pnlint demo', () => {
  it('exits 0 and shows, per example, the fixes --fix would apply one after another', () => {
    const run = pnlint(['demo'], root, { NO_COLOR: '1' });
    expect(run.code).toBe(0);
    const lamp = run.stdout.slice(run.stdout.indexOf('reversed-lamp.cir —'));
    const planned = lamp.slice(lamp.indexOf('--fix would apply:'), lamp.indexOf('\n==')).split('\n').slice(1).filter((line) => line.trim());
    // Turned around, the LED conducts and no longer sees reverse voltage (a forward-biased
    // junction; common practice, no source): the flip alone fixes both findings, so the
    // guard diode offered for the reverse voltage is not applied after it.
    expect(planned).toHaveLength(1);
    expect(planned[0]).toMatch(/^\s+Turn DLAMP around/);
  });
});

describe('pnlint check output order', () => {
  it('lists a file\'s findings in line order, whatever stage found them', () => {
    // The LED problem is on line 3; a `.model` with no name on line 5 does not parse.
    writeFileSync(join(folder, 'mixed.cir'), ['mixed problems', 'V1 vcc 0 DC 5', 'D1 vcc 0 DRED', '.model DRED D(IS=1e-20 N=1.7 RS=2)', '.model', '.end', ''].join('\n'));
    const report = JSON.parse(pnlint(['check', 'mixed.cir', '--format', 'json'], folder).stdout);
    const lines = report.files[0].findings.map((f: { range: { start: { line: number } } }) => f.range.start.line);
    expect(lines).toContain(3);
    expect(lines).toContain(5);
    expect(lines).toEqual([...lines].sort((a: number, b: number) => a - b));
  });
});
