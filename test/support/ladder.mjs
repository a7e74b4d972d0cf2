// @ts-check
// Generates resistor–diode ladders: a 5 V source feeding a chain of series
// resistors with a diode from every rung to ground. Used by the reference test
// (2,000 sections) and by the ladder benchmark (2,000 and 20,000 sections).
// Plain JavaScript so that plain Node (the benchmarks) and vitest both load it.

/** The series resistances cycle through these values (ohms) so that no two neighbouring rungs are alike. */
const SERIES_RESISTANCES = [10, 12, 15, 18, 22];

/**
 * @param {number} sections  number of resistor + diode sections
 * @param {{ ammeters?: boolean }} [options]
 *   `ammeters`: a 0 V source in series with each diode (`VAMk`), so that ngspice reports its current
 * @returns {string} the netlist text
 */
export function resistorDiodeLadder(sections, options = {}) {
  const lines = [
    `resistor-diode ladder, ${sections} sections`,
    '* What it is: a generated chain of series resistors from a 5 V source, a diode from every rung to ground.',
    'V1 n0 0 5',
  ];
  for (let section = 1; section <= sections; section++) {
    const resistance = SERIES_RESISTANCES[section % SERIES_RESISTANCES.length];
    lines.push(`R${section} n${section - 1} n${section} ${resistance}`);
    if (options.ammeters) {
      lines.push(`VAM${section} n${section} a${section} 0`);
      lines.push(`D${section} a${section} 0 DRUNG`);
    } else {
      lines.push(`D${section} n${section} 0 DRUNG`);
    }
  }
  lines.push('.model DRUNG D(IS=1e-14 N=1.05 RS=0.5)', '.end', '');
  return lines.join('\n');
}
