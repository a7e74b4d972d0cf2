// Numbers as the netlist module writes them into a netlist: SPICE notation for edits
// (`4.7k`, `2.2Meg`: SPICE reads `M` as milli). Messages use `units.ts`.

const SPICE_SCALES: readonly { factor: number; spice: string }[] = [
  { factor: 1e12, spice: 'T' },
  { factor: 1e9, spice: 'G' },
  { factor: 1e6, spice: 'Meg' },
  { factor: 1e3, spice: 'k' },
  { factor: 1, spice: '' },
  { factor: 1e-3, spice: 'm' },
  { factor: 1e-6, spice: 'u' },
  { factor: 1e-9, spice: 'n' },
  { factor: 1e-12, spice: 'p' },
  { factor: 1e-15, spice: 'f' },
];

/** Significant digits kept when writing a number: enough for any E192 value, short enough to read. */
const SIGNIFICANT_DIGITS = 12;

function split(value: number): { mantissa: string; scale: (typeof SPICE_SCALES)[number] } {
  const magnitude = Math.abs(value);
  const scale =
    magnitude === 0 || !Number.isFinite(magnitude)
      ? SPICE_SCALES[4]!
      : (SPICE_SCALES.find((s) => magnitude >= s.factor * (1 - 1e-12)) ?? SPICE_SCALES[SPICE_SCALES.length - 1]!);
  const mantissa = Number((value / scale.factor).toPrecision(SIGNIFICANT_DIGITS)).toString();
  return { mantissa, scale };
}

/** `4700` → `4.7k`, `2.2e6` → `2.2Meg`, `0.47` → `470m`: text that every SPICE engine reads exactly. */
export function formatSpiceNumber(value: number): string {
  const { mantissa, scale } = split(value);
  return mantissa + scale.spice;
}


/** The unit of an element's main value, by element letter. */
export function unitOfElement(letter: string): string {
  switch (letter.toUpperCase()) {
    case 'R':
      return 'Ω';
    case 'C':
      return 'F';
    case 'L':
      return 'H';
    case 'V':
      return 'V';
    case 'I':
      return 'A';
    default:
      return '';
  }
}
