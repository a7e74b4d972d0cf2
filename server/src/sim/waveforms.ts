// Independent source waveforms, evaluated at a time: the one place that knows their
// definitions (SPICE3 user's manual, Quarles 1989; as ngspice 39 evaluates them).
import type { Waveform } from '../netlist/circuit.js';

/** The value (V or A) of a source's waveform at `time` seconds. Never throws; bad parameters give a finite value where they can. */
export function sourceValueAt(waveform: Waveform, time: number): number {
  switch (waveform.shape) {
    case 'dc':
      return waveform.value;
    case 'sin': {
      const phase = (waveform.phase * Math.PI) / 180;
      const elapsed = time - waveform.delay;
      if (elapsed <= 0) return waveform.offset + waveform.amplitude * Math.sin(phase);
      return (
        waveform.offset +
        waveform.amplitude * Math.sin(2 * Math.PI * waveform.frequency * elapsed + phase) * Math.exp(-elapsed * waveform.damping)
      );
    }
    case 'pulse': {
      const { initial, pulsed, rise, fall, width, period } = waveform;
      let elapsed = time - waveform.delay;
      if (period > 0 && elapsed > period) elapsed -= period * Math.floor(elapsed / period);
      if (elapsed <= 0 || elapsed >= rise + width + fall) return initial;
      if (elapsed >= rise && elapsed <= rise + width) return pulsed;
      if (elapsed < rise) return initial + ((pulsed - initial) * elapsed) / rise;
      return pulsed + ((initial - pulsed) * (elapsed - rise - width)) / fall;
    }
    case 'pwl': {
      const points = waveform.points;
      if (points.length === 0) return 0;
      if (time <= points[0].time) return points[0].value;
      for (let i = 1; i < points.length; i++) {
        const before = points[i - 1];
        const after = points[i];
        if (time <= after.time) {
          const span = after.time - before.time;
          if (!(span > 0)) return after.value;
          return before.value + ((after.value - before.value) * (time - before.time)) / span;
        }
      }
      return points[points.length - 1].value;
    }
    case 'exp': {
      const { initial, pulsed, riseDelay, riseTau, fallDelay, fallTau } = waveform;
      if (time <= riseDelay) return initial;
      let value = initial + (pulsed - initial) * (1 - Math.exp(-(time - riseDelay) / riseTau));
      if (time > fallDelay) value += (initial - pulsed) * (1 - Math.exp(-(time - fallDelay) / fallTau));
      return value;
    }
    case 'sffm':
      return (
        waveform.offset +
        waveform.amplitude *
          Math.sin(2 * Math.PI * waveform.carrier * time + waveform.modulationIndex * Math.sin(2 * Math.PI * waveform.signal * time))
      );
  }
}
