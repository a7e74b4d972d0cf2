// @ts-check
// Generates a large, correct board for the check benchmark: many LED
// indicators, each with its own series resistor, and a silicon diode in series
// with each for reverse protection. A healthy circuit, so the figure is the
// cost of checking, not of reporting.

/**
 * @param {number} diodes  total number of diodes (LEDs plus protection diodes), even
 * @returns {string} the netlist text
 */
export function indicatorBoard(diodes) {
  const indicators = Math.max(1, Math.floor(diodes / 2));
  const lines = [
    `indicator board, ${indicators} LEDs with their resistors and protection diodes`,
    '* What it is: a generated 5 V board of LED indicators, each LED behind its own 390 ohm resistor and a series silicon diode.',
    'V1 vcc 0 5',
  ];
  for (let index = 1; index <= indicators; index++) {
    lines.push(`DP${index} vcc p${index} DPROTECT`);
    lines.push(`R${index} p${index} a${index} 390`);
    lines.push(`DL${index} a${index} 0 DLED`);
  }
  lines.push('.model DPROTECT D(IS=2.5e-9 N=1.75 RS=0.5 BV=75 IBV=5u)', '.model DLED D(IS=1e-20 N=1.8 RS=2.5)', '.end', '');
  return lines.join('\n');
}
