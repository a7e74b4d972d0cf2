// Classification from the model (product.md): forward voltage at a few mA above about
// 1 V is an LED (infrared emitters drop about 1.1–1.4 V), below about 0.45 V a Schottky; a BV of tens of volts or less with
// reverse use suggests a zener; then the model's name. Forward voltages come from ngspice 39
// forcing 5 mA through the model, and sit where the trade expects them (about 0.7 V
// silicon, about 0.4 V Schottky, above 2 V for most LEDs: common practice, no source).
import { describe, expect, it } from 'vitest';
import { declareNgspiceGate } from '../support/ngspice.js';
import { check, ngspiceValue } from './support.js';

const ngspiceRuns = declareNgspiceGate();

const forwardAt5mA = (model: string) => ngspiceValue(`probe\nI1 0 a 5m\nD1 a 0 M\n.model M ${model}\n.end\n`, 'v(a)');
const classify = (model: string, circuit?: string) =>
  check(circuit ?? `diode with a resistor\nV1 vcc 0 5\nR1 vcc a 1k\nD1 a 0 M\n.model M ${model}\n.end\n`).diodes[0]!;

describe.runIf(ngspiceRuns)('classification', () => {
  it('takes a blue LED model (about 3 V) as an LED', () => {
    const model = 'D(IS=1e-28 N=2.5 RS=3)';
    const vf = forwardAt5mA(model); // ngspice 39
    expect(vf).toBeGreaterThan(2); // above 2 V for most LEDs (common practice, no source)
    const diode = classify(model);
    expect(diode.kind).toBe('led');
    expect(diode.kindReason).toContain(`${vf.toPrecision(3)} V at 5 mA`);
  });
  it('takes an infrared emitter model (about 1.2 V) as an LED', () => {
    const model = 'D(IS=5e-14 N=1.8 RS=2)';
    const vf = forwardAt5mA(model); // ngspice 39
    // Infrared emitters drop about 1.1–1.4 V, well above silicon's 0.7 V (common practice, no source).
    expect(vf).toBeGreaterThan(1.05);
    expect(vf).toBeLessThan(1.4);
    expect(classify(model).kind).toBe('led');
  });
  it('takes a Schottky model (about 0.3 V) as a Schottky', () => {
    const model = 'D(IS=1u N=1.05 RS=0.1)';
    expect(forwardAt5mA(model)).toBeLessThan(0.45); // ngspice 39; about 0.4 V for Schottky (common practice, no source)
    expect(classify(model).kind).toBe('schottky');
  });
  it('takes a silicon junction (about 0.7 V) as a small-signal diode, and says how to correct it', () => {
    const model = 'D(IS=2.5n N=1.75 RS=0.5 BV=100)';
    const vf = forwardAt5mA(model); // ngspice 39
    expect(vf).toBeGreaterThan(0.55);
    expect(vf).toBeLessThan(0.8); // about 0.7 V for silicon (common practice, no source)
    const diode = classify(model);
    expect(diode.kind).toBe('signal');
    expect(diode.kindReason).toContain('kind=rectifier');
  });
  it('takes a low-BV junction that the circuit drives into breakdown as a zener', () => {
    const regulator = 'shunt regulator\nV1 vin 0 12\nR1 vin z 1k\nD1 0 z M\n.model M D(IS=1e-14 BV=6.2 IBV=1m)\n.end\n';
    const diode = check(regulator).diodes[0]!;
    expect(diode.kind).toBe('zener');
    expect(diode.kindReason).toContain('breakdown');
  });
  it('falls back on the model name', () => {
    const circuit = 'clamp at rest\nV1 vin 0 3.3\nR1 vin z 1k\nD1 0 z ZEN62\n.model ZEN62 D(IS=1e-14 BV=6.2 IBV=1m)\n.end\n';
    expect(check(circuit).diodes[0]!.kind).toBe('zener');
  });
});
