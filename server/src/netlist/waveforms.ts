// Independent source waveforms with the SPICE3 defaults for missing arguments
// (SPICE3 user's manual, Quarles 1989, "Independent sources"; the ngspice 39
// manual keeps them): they refer to the `.tran` step (TSTEP) and stop time (TSTOP).
import type { Waveform } from './circuit.js';

export type WaveformShape = Exclude<Waveform['shape'], 'dc'>;

export const WAVEFORM_SHAPES: readonly WaveformShape[] = ['sin', 'pulse', 'pwl', 'exp', 'sffm'];

/** The `.tran` step and stop time that the defaults refer to. */
export interface TransientTimes {
  step: number;
  stop: number;
}

/**
 * Without a `.tran` line there is no TSTEP or TSTOP: edges are then taken as
 * instantaneous (TSTEP = 0) and a pulse's width and period as unending
 * (TSTOP = ∞), which is the quasi-static reading the DC checks use.
 */
export const TIMES_WITHOUT_TRANSIENT: TransientTimes = { step: 0, stop: Number.POSITIVE_INFINITY };

/** How many arguments each shape takes at most (PWL: any even number). */
export const WAVEFORM_ARGUMENTS: Readonly<Record<WaveformShape, number>> = { sin: 6, pulse: 7, pwl: Infinity, exp: 6, sffm: 5 };
/** How many arguments a shape needs at least. */
export const WAVEFORM_REQUIRED: Readonly<Record<WaveformShape, number>> = { sin: 2, pulse: 2, pwl: 2, exp: 2, sffm: 2 };

const frequencyOf = (stop: number) => (Number.isFinite(stop) && stop > 0 ? 1 / stop : 0);

/** The waveform with SPICE3's defaults filled in. `args` are the evaluated arguments as written. */
export function buildWaveform(shape: WaveformShape, args: number[], times: TransientTimes): Waveform {
  const at = (index: number, fallback: number) => args[index] ?? fallback;
  switch (shape) {
    case 'sin':
      return {
        shape,
        offset: at(0, 0),
        amplitude: at(1, 0),
        frequency: at(2, frequencyOf(times.stop)),
        delay: at(3, 0),
        damping: at(4, 0),
        // Phase in degrees, an ngspice addition to SPICE3's SIN (ngspice 39 manual).
        phase: at(5, 0),
      };
    case 'pulse':
      return {
        shape,
        initial: at(0, 0),
        pulsed: at(1, 0),
        delay: at(2, 0),
        rise: at(3, times.step),
        fall: at(4, times.step),
        width: at(5, times.stop),
        period: at(6, times.stop),
      };
    case 'exp': {
      const riseDelay = at(2, 0);
      return {
        shape,
        initial: at(0, 0),
        pulsed: at(1, 0),
        riseDelay,
        riseTau: at(3, times.step),
        fallDelay: at(4, riseDelay + times.step),
        fallTau: at(5, times.step),
      };
    }
    case 'sffm':
      return {
        shape,
        offset: at(0, 0),
        amplitude: at(1, 0),
        carrier: at(2, frequencyOf(times.stop)),
        modulationIndex: at(3, 0),
        signal: at(4, frequencyOf(times.stop)),
      };
    case 'pwl': {
      const points: { time: number; value: number }[] = [];
      for (let i = 0; i + 1 < args.length; i += 2) points.push({ time: args[i]!, value: args[i + 1]! });
      return { shape, points };
    }
  }
}

/**
 * The value at t = 0, which is what ngspice 39 uses for `.op` when a source has
 * no DC value (checked by running it: SIN gives offset + amplitude·sin(phase),
 * whatever its delay; PULSE and EXP their initial value; PWL its value at 0,
 * its first value when the first point is later; SFFM its offset).
 */
export function valueAtTimeZero(waveform: Waveform): number {
  switch (waveform.shape) {
    case 'dc':
      return waveform.value;
    case 'sin':
      return waveform.offset + waveform.amplitude * Math.sin((waveform.phase * Math.PI) / 180);
    case 'pulse':
      return waveform.initial;
    case 'exp':
      return waveform.initial;
    case 'sffm':
      return waveform.offset;
    case 'pwl': {
      const points = waveform.points;
      if (points.length === 0) return 0;
      if (points[0]!.time >= 0) return points[0]!.value;
      for (let i = 1; i < points.length; i++) {
        const before = points[i - 1]!;
        const after = points[i]!;
        if (after.time >= 0) {
          const span = after.time - before.time;
          return span > 0 ? before.value + ((after.value - before.value) * (0 - before.time)) / span : after.value;
        }
      }
      return points[points.length - 1]!.value;
    }
  }
}
