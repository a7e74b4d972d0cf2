// The operating-point report of `pnlint op` (and of the editor's "show operating point"):
// every corner's node voltages, branch currents and each diode's kind, rating and margin.
import type { Analysis } from '../analysis.js';
import type { DiodeReport } from '../checks/index.js';
import { formatQuantity } from '../units.js';

/** The JSON shape: `{"corners":[{"name","nodes","branches","diodes":{element:{voltage,current,power,region,…}}}]}`. */
export function operatingPointJson(analysis: Analysis): unknown {
  const check = analysis.check;
  const corners = (check?.solves ?? []).map((solve, index) => {
    const plan = check!.cornerPlans[index];
    const name = solve.ok ? solve.point.corner : solve.corner;
    if (!solve.ok) {
      return { name, description: plan?.description, solved: false, problems: solve.diagnostics.map((d) => d.message) };
    }
    const diodes: Record<string, unknown> = {};
    for (const [element, point] of Object.entries(solve.point.diodes)) {
      const report = check!.diodes.find((diode) => diode.element === element);
      const atCorner = report?.corners.find((corner) => corner.corner === name);
      diodes[element] = {
        voltage: point.voltage,
        current: point.current,
        power: point.power,
        region: point.region,
        ...(report ? { kind: report.kind, kindReason: report.kindReason } : {}),
        ...(atCorner ? { margins: atCorner.margins } : {}),
      };
    }
    return {
      name,
      description: plan?.description,
      solved: true,
      quasiStatic: plan?.quasiStatic ?? false,
      nodes: solve.point.nodes,
      branches: solve.point.branches,
      diodes,
    };
  });
  const ratings = Object.fromEntries(
    (check?.diodes ?? []).map((diode) => [
      diode.element,
      { kind: diode.kind, kindReason: diode.kindReason, model: diode.model, ratings: diode.ratings.map((r) => ({ symbol: r.symbol, value: r.value, unit: r.unit, source: r.text })), ...(diode.unchecked ? { unchecked: diode.unchecked } : {}) },
    ]),
  );
  return { corners, diodes: ratings, cautions: analysis.findings.filter((f) => f.rule === 'hazardous-voltage').map((f) => f.message) };
}

export function formatOperatingPointJson(analysis: Analysis): string {
  return JSON.stringify(operatingPointJson(analysis), null, 2) + '\n';
}

/**
 * Node voltages below this are shown as 0 V: they are rounding residue (e.g. a SIN source's
 * sin(0) at its nominal corner), a million times below SPICE's default vntol of 1 µV.
 */
const DISPLAY_ZERO_VOLTAGE = 1e-12;

function volts(value: number): string {
  return formatQuantity(Math.abs(value) < DISPLAY_ZERO_VOLTAGE ? 0 : value, 'V');
}

function table(header: string[], rows: string[][]): string[] {
  const widths = header.map((title, column) => Math.max(title.length, ...rows.map((row) => (row[column] ?? '').length)));
  const line = (cells: string[]) => cells.map((cell, column) => cell.padEnd(widths[column]!)).join('  ').trimEnd();
  return [line(header), line(widths.map((width) => '-'.repeat(width))), ...rows.map(line)];
}

function marginText(report: DiodeReport | undefined, corner: string): string {
  const margins = report?.corners.find((each) => each.corner === corner)?.margins ?? [];
  if (margins.length === 0) return '';
  const worst = margins.reduce((a, b) => (b.fraction > a.fraction ? b : a));
  const symbol = report!.ratings.find((rating) => rating.key === worst.key)?.symbol ?? worst.key;
  return `${Math.round(worst.fraction * 100)} % of ${symbol}`;
}

/** A readable table per corner, for people. */
export function formatOperatingPointText(analysis: Analysis): string {
  const check = analysis.check;
  const out: string[] = [];
  if (analysis.circuit?.title) out.push(analysis.circuit.title, '');
  for (const caution of analysis.findings.filter((f) => f.rule === 'hazardous-voltage')) out.push(`CAUTION: ${caution.message}`, '');
  if (check && check.diodes.length > 0) {
    out.push('Diodes');
    out.push(
      ...table(
        ['diode', 'model', 'kind', 'why', 'ratings'],
        check.diodes.map((diode) => [diode.element, diode.model, diode.kind, diode.kindReason, diode.unchecked ? `not checked: ${diode.unchecked}` : diode.ratings.map((r) => r.text).join('; ')]),
      ),
      '',
    );
  }
  (check?.solves ?? []).forEach((solve, index) => {
    const plan = check!.cornerPlans[index];
    const name = solve.ok ? solve.point.corner : solve.corner;
    out.push(`Corner ${name}: ${plan?.description ?? ''}${plan?.quasiStatic ? ' (quasi-static)' : ''}`);
    if (!solve.ok) {
      out.push(...solve.diagnostics.map((d) => `  not solved: ${d.message}`), '');
      return;
    }
    const point = solve.point;
    out.push(...table(['node', 'voltage'], Object.entries(point.nodes).map(([node, value]) => [node, volts(value)])).map((l) => `  ${l}`));
    out.push('');
    out.push(...table(['element', 'current'], Object.entries(point.branches).map(([element, amps]) => [element, formatQuantity(amps, 'A')])).map((l) => `  ${l}`));
    const diodes = Object.entries(point.diodes);
    if (diodes.length) {
      out.push('');
      out.push(
        ...table(
          ['diode', 'Vf/Vr', 'If', 'P', 'region', 'worst margin'],
          diodes.map(([element, d]) => [
            element,
            volts(d.voltage),
            formatQuantity(d.current, 'A'),
            formatQuantity(d.power, 'W'),
            d.region,
            marginText(check!.diodes.find((diode) => diode.element === element), name),
          ]),
        ).map((l) => `  ${l}`),
      );
    }
    out.push(`  (${point.method}, ${point.iterations} iterations, ${point.milliseconds.toFixed(1)} ms)`, '');
  });
  if (!check || check.solves.length === 0) out.push('No operating point: the circuit could not be elaborated or has nothing to solve.');
  const problems = analysis.findings.filter((f) => f.severity === 'error' && (f.rule === 'syntax' || f.rule === 'netlist'));
  for (const problem of problems) out.push(`${problem.location.range.start.line + 1}:${problem.location.range.start.column + 1} ${problem.rule} ${problem.message}`);
  return out.join('\n') + '\n';
}
