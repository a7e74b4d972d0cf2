// The words of the checks: diode kinds, the datasheet rating keys (as product.md fixes
// them) and how each is shown. One place, read by directives, pnlint.json, ratings and
// the reports.

export const DIODE_KINDS = ['led', 'zener', 'schottky', 'rectifier', 'signal'] as const;
export type DiodeKind = (typeof DIODE_KINDS)[number];

/** How a kind is named in messages. */
export const KIND_NAMES: Readonly<Record<DiodeKind, string>> = {
  led: 'LED',
  zener: 'zener diode',
  schottky: 'Schottky diode',
  rectifier: 'rectifier diode',
  signal: 'small-signal diode',
};

/** A kind's name opening a sentence: "Small-signal diode D4 carries …". */
export function kindNameOpening(kind: DiodeKind): string {
  const name = KIND_NAMES[kind];
  return name.charAt(0).toUpperCase() + name.slice(1);
}

export const DIODE_RATING_KEYS = ['vrrm', 'if', 'ifsm', 'pd', 'vz', 'izt', 'izk', 'izm'] as const;
export type DiodeRatingKey = (typeof DIODE_RATING_KEYS)[number];

export const RESISTOR_RATING_KEYS = ['p', 'tol'] as const;
export type ResistorRatingKey = (typeof RESISTOR_RATING_KEYS)[number];

export type RatingKey = DiodeRatingKey | ResistorRatingKey;

/** The datasheet symbol and the unit of each rating key. */
export const RATING_SYMBOLS: Readonly<Record<RatingKey, { symbol: string; unit: string; meaning: string }>> = {
  vrrm: { symbol: 'VRRM', unit: 'V', meaning: 'repetitive peak reverse voltage' },
  if: { symbol: 'IF', unit: 'A', meaning: 'continuous forward current' },
  ifsm: { symbol: 'IFSM', unit: 'A', meaning: 'non-repetitive surge forward current' },
  pd: { symbol: 'PD', unit: 'W', meaning: 'power dissipation' },
  vz: { symbol: 'VZ', unit: 'V', meaning: 'zener voltage' },
  izt: { symbol: 'IZT', unit: 'A', meaning: 'zener test current' },
  izk: { symbol: 'IZK', unit: 'A', meaning: 'minimum regulating (knee) current' },
  izm: { symbol: 'IZM', unit: 'A', meaning: 'maximum zener current' },
  p: { symbol: 'P', unit: 'W', meaning: 'power rating' },
  tol: { symbol: 'tolerance', unit: '%', meaning: 'value tolerance' },
};

export function isDiodeKind(text: string): text is DiodeKind {
  return (DIODE_KINDS as readonly string[]).includes(text);
}

export function isDiodeRatingKey(text: string): text is DiodeRatingKey {
  return (DIODE_RATING_KEYS as readonly string[]).includes(text);
}

export function isResistorRatingKey(text: string): text is ResistorRatingKey {
  return (RESISTOR_RATING_KEYS as readonly string[]).includes(text);
}
