// A diode in series with a resistor has an exact closed-form current through the Lambert W
// function: I = (n·Vt/R)·W((Is·R/(n·Vt))·exp((Vs + Is·R)/(n·Vt))) − Is
// (Banwell and Jayakumar, "Exact analytical solution for current flow through diode with
// series resistance", Electronics Letters 36(4), 2000). The solver must reach it over
// ten decades of current.
import { describe, expect, it } from 'vitest';
import { BOLTZMANN, ELEMENTARY_CHARGE, REFERENCE_TEMPERATURE } from '../../server/src/sim/index.js';
import { expectKirchhoff, pointOf } from './helpers.js';

/**
 * Principal branch of Lambert W for x = e^L, by Halley's iteration on w + ln w = L
 * (the defining equation w·e^w = x in logarithmic form, so that large arguments do not overflow).
 */
function lambertWOfExp(L: number): number {
  let w = L > 1 ? L - Math.log(L) : Math.exp(L);
  for (let i = 0; i < 100; i++) {
    const f = w + Math.log(w) - L;
    const slope = 1 + 1 / w;
    const curvature = -1 / (w * w);
    let next = w - (2 * f * slope) / (2 * slope * slope - f * curvature);
    if (!(next > 0)) next = w / 10;
    if (Math.abs(next - w) <= 1e-16 * w) return next;
    w = next;
  }
  return w;
}

/** The exact series-diode current of Banwell and Jayakumar (2000). */
function exactCurrent(supply: number, resistance: number, saturationCurrent: number, emission: number, temperature: number): number {
  const nVt = (emission * BOLTZMANN * temperature) / ELEMENTARY_CHARGE;
  const L = Math.log((saturationCurrent * resistance) / nVt) + (supply + saturationCurrent * resistance) / nVt;
  return (nVt / resistance) * lambertWOfExp(L) - saturationCurrent;
}

const SATURATION_CURRENT = 1e-14;
const EMISSION = 1.5;

/** From about 4 nA to about 23 A: supply (V) and series resistance (Ω). */
const CASES: [number, number][] = [
  [0.5, 1e5],
  [0.7, 1e4],
  [1, 1e4],
  [1, 1e3],
  [5, 1e3],
  [5, 100],
  [12, 10],
  [24, 1],
];

function netlist(supply: number, resistance: number, options: string): string {
  return `series diode
V1 in 0 ${supply}
R1 in a ${resistance}
D1 a 0 DSERIES
.model DSERIES D(IS=${SATURATION_CURRENT} N=${EMISSION})
${options}
.end
`;
}

describe('diode with a series resistor against the exact Lambert-W solution (Banwell and Jayakumar 2000)', () => {
  // gmin = 0: the published solution has no conductance across the junction.
  const tight = '.options gmin=0 reltol=1e-9 vntol=1e-12 abstol=1e-18';

  it.each(CASES)('Vs = %s V, R = %s Ω: current to 1e-7 relative with tight tolerances', (supply, resistance) => {
    const expected = exactCurrent(supply, resistance, SATURATION_CURRENT, EMISSION, REFERENCE_TEMPERATURE);
    const text = netlist(supply, resistance, tight);
    const point = pointOf(text);
    expect(Math.abs(point.diodes.D1.current - expected) / expected).toBeLessThan(1e-7);
    // The diode voltage is what the resistor leaves of the supply.
    expect(point.diodes.D1.voltage).toBeCloseTo(supply - expected * resistance, 6);
    expect(point.diodes.D1.region).toBe('forward');
    expectKirchhoff(text, point, 1e-9, 1e-15);
  });

  it.each(CASES)('Vs = %s V, R = %s Ω: within the default reltol of 1e-3 (SPICE3 default) at default tolerances', (supply, resistance) => {
    const expected = exactCurrent(supply, resistance, SATURATION_CURRENT, EMISSION, REFERENCE_TEMPERATURE);
    const text = netlist(supply, resistance, '.options gmin=0');
    const point = pointOf(text);
    expect(Math.abs(point.diodes.D1.current - expected) / expected).toBeLessThan(1e-3);
    expectKirchhoff(text, point, 1e-6, 1e-12);
  });

  it('a warm start from a nearby solution reaches the exact current in fewer iterations (RS adds to R in series)', () => {
    const text = `series diode with RS
V1 in 0 5
R1 in a 998
D1 a 0 DRS
.model DRS D(IS=${SATURATION_CURRENT} N=${EMISSION} RS=2)
${tight}
.end
`;
    const expected = exactCurrent(5, 1000, SATURATION_CURRENT, EMISSION, REFERENCE_TEMPERATURE);
    const cold = pointOf(text);
    const warm = pointOf(text, undefined, { initialGuess: { in: 5, a: 1.04 } });
    expect(Math.abs(cold.diodes.D1.current - expected) / expected).toBeLessThan(1e-7);
    expect(Math.abs(warm.diodes.D1.current - expected) / expected).toBeLessThan(1e-7);
    expect(warm.iterations).toBeLessThan(cold.iterations);
  });

  it('at 75 °C it follows the exact solution with Is moved by the SPICE3 temperature law (XTI = 0, EG = 0.1 eV)', () => {
    // SPICE3 user's manual (Quarles 1989): Is(T) = Is·(T/Tnom)^(XTI/N)·exp((T/Tnom − 1)·EG/(N·Vt)).
    const celsius = 75;
    const temperature = celsius + 273.15;
    const ratio = temperature / REFERENCE_TEMPERATURE;
    const nVt = (EMISSION * BOLTZMANN * temperature) / ELEMENTARY_CHARGE;
    const scaledSaturation = SATURATION_CURRENT * Math.exp(((ratio - 1) * 0.1) / nVt);
    const expected = exactCurrent(5, 1000, scaledSaturation, EMISSION, temperature);
    const text = `series diode, hot
V1 in 0 5
R1 in a 1000
D1 a 0 DHOT
.model DHOT D(IS=${SATURATION_CURRENT} N=${EMISSION} XTI=0 EG=0.1)
${tight}
.end
`;
    const point = pointOf(text, { name: 'hot', temperature: celsius });
    expect(Math.abs(point.diodes.D1.current - expected) / expected).toBeLessThan(1e-7);
  });
});
