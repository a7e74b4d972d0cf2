// The shipped library of generic part classes: what a diode of each kind is typically
// rated for when nothing better is known. Every figure here is a typical datasheet value
// from memory (marked so beside it), not a guarantee for any particular part; a directive
// or pnlint.json always overrides it, and messages say when a figure came from here.
import type { DiodeKind, DiodeRatingKey } from './vocabulary.js';

export interface PartClass {
  /** How messages name the class, with its article: "typical value for a small-signal diode". */
  description: string;
  ratings: Partial<Record<DiodeRatingKey, number>>;
  /** Ratings that are trade rules of thumb (common practice, no source) rather than typical values. */
  rulesOfThumb?: readonly DiodeRatingKey[];
}

export const PART_CLASSES: Readonly<Record<DiodeKind, PartClass>> = {
  led: {
    description: 'an indicator LED',
    ratings: {
      if: 20e-3, // 20 mA continuous: rule of thumb for LEDs (common practice, no source)
      vrrm: 5, // 5 V reverse: rule of thumb for LEDs (common practice, no source)
      pd: 100e-3, // typical value, from memory (5 mm indicator LEDs)
    },
    rulesOfThumb: ['if', 'vrrm'],
  },
  signal: {
    description: 'a small-signal diode',
    ratings: {
      if: 200e-3, // typical value, from memory
      ifsm: 1, // typical value, from memory (1 s surge)
      vrrm: 75, // typical value, from memory
      pd: 500e-3, // typical value, from memory
    },
  },
  rectifier: {
    description: 'a rectifier diode',
    ratings: {
      if: 1, // typical value, from memory (the smallest common axial rectifiers)
      ifsm: 30, // typical value, from memory
      // No typical reverse rating: rectifiers span 50 V to 1000 V; the model's BV or a directive must say.
    },
  },
  schottky: {
    description: 'a Schottky diode',
    ratings: {
      if: 1, // typical value, from memory (small power Schottky rectifiers)
      ifsm: 25, // typical value, from memory
      // No typical reverse rating: 20 V to 100 V parts are all common.
    },
  },
  zener: {
    description: 'a small zener diode',
    ratings: {
      izk: 1e-3, // minimum regulating current: typical value, from memory (small glass zeners, 0.25–1 mA)
      pd: 500e-3, // typical value, from memory
    },
  },
};
