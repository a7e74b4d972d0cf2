// Bad input never throws and nothing hangs (the project's standards): random small circuits
// and random directive text go through the whole check.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { check } from './support.js';

const NODES = ['0', 'a', 'b', 'c', 'gnd'];
const MODELS = [
  '.model LED D(IS=1e-20 N=1.8 RS=2 BV=5 IBV=10u)',
  '.model SIG D(IS=2.5n N=1.75 RS=0.5 BV=100)',
  '.model ZEN D(IS=1e-14 BV=5.1 IBV=1m)',
  '.model SW1 SW(RON=1 ROFF=1meg VT=1)',
];
const node = fc.constantFrom(...NODES);
const value = fc.oneof(fc.double({ min: -500, max: 500, noNaN: true }), fc.constantFrom(0, 1e-12, 1e9, -1e-9));
const positive = fc.double({ min: 1e-6, max: 1e8, noNaN: true });
const element = fc.oneof(
  fc.tuple(node, node, positive).map(([p, n, r]) => `R ${p} ${n} ${r}`),
  fc.tuple(node, node, value).map(([p, n, v]) => `V ${p} ${n} ${v}`),
  fc.tuple(node, node, value).map(([p, n, v]) => `V ${p} ${n} SIN(0 ${v} 50)`),
  fc.tuple(node, node, fc.double({ min: -2, max: 2, noNaN: true })).map(([p, n, v]) => `I ${p} ${n} ${v}`),
  fc.tuple(node, node, fc.constantFrom('LED', 'SIG', 'ZEN')).map(([p, n, m]) => `D ${p} ${n} ${m}`),
  fc.tuple(node, node, positive).map(([p, n, c]) => `C ${p} ${n} ${c}u`),
  fc.tuple(node, node, positive).map(([p, n, l]) => `L ${p} ${n} ${l}m`),
  fc.tuple(node, node, node, node).map(([p, n, cp, cn]) => `S ${p} ${n} ${cp} ${cn} SW1`),
);
const directive = fc.oneof(
  fc.string({ maxLength: 40 }).map((text) => `*pnlint: ${text}`),
  fc.tuple(fc.constantFrom('rating', 'supply', 'ignore', 'ignore-file', 'bogus'), fc.constantFrom('D1', 'LED', 'V1', 'R1', 'x'), fc.string({ maxLength: 20 })).map(
    ([command, target, rest]) => `*pnlint: ${command} ${target} ${rest}`,
  ),
  fc.constant('*pnlint: rating LED if=0 vrrm=-3 kind=zener'),
  fc.constant('*pnlint: supply V1 min=5 max=1'),
);

describe('robustness', () => {
  it('checks random small circuits and directives without throwing, each in bounded time', () => {
    fc.assert(
      fc.property(fc.array(element, { minLength: 1, maxLength: 8 }), fc.array(directive, { maxLength: 3 }), (elements, directives) => {
        const lines = elements.map((line, index) => line.replace(/^(\w)/, `$1${index + 1}`));
        const text = ['random circuit', ...directives, ...lines, ...MODELS, '.end', ''].join('\n');
        const started = performance.now();
        const result = check(text, { check: { budgetMilliseconds: 500 } });
        expect(performance.now() - started).toBeLessThan(20_000);
        expect(Array.isArray(result.findings)).toBe(true);
      }),
      { numRuns: 60, seed: 4242 },
    );
  });
  it('gives clear directive diagnostics for empty and half-written directives, and nothing for an empty file', () => {
    expect(check('').findings).toEqual([]);
    const messages = check('x\n*pnlint: rating\n*pnlint:\n*pnlint: ignore\n.end\n').findings.map((finding) => `${finding.rule}: ${finding.message}`);
    expect(messages).toEqual([
      expect.stringMatching(/^directive: A rating directive needs a model or instance name/),
      expect.stringMatching(/^directive: Empty pnlint directive/),
      expect.stringMatching(/^directive: ignore needs the rule ids/),
    ]);
  });
});
