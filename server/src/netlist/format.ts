// Numbers as the netlist module writes them: in SPICE notation for edits
// (`4.7k`, `2.2Meg`: SPICE reads `M` as milli) and in engineering notation
// with a unit for messages (`4.7 kΩ`).

const SPICE_SCALES: readonly { factor: number; spice: string; si: string }[] = [
  { factor: 1e12, spice: 'T', si: 'T' },
  { factor: 1e9, spice: 'G', si: 'G' },
  { factor: 1e6, spice: 'Meg', si: 'M' },
  { factor: 1e3, spice: 'k', si: 'k' },
  { factor: 1, spice: '', si: '' },
  { factor: 1e-3, spice: 'm', si: 'm' },
  { factor: 1e-6, spice: 'u', si: 'µ' },
  { factor: 1e-9, spice: 'n', si: 'n' },
  { factor: 1e-12, spice: 'p', si: 'p' },
  { factor: 1e-15, spice: 'f', si: 'f' },
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

/** `4000, 'Ω'` → `4 kΩ`. */
export function formatQuantity(value: number, unit: string): string {
  const { mantissa, scale } = split(value);
  return `${mantissa} ${scale.si}${unit}`.trimEnd();
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
