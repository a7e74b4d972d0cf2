// readSpiceNumber against the scale-factor table of the SPICE3 user's manual
// (Quarles, 1989): T=1e12, G=1e9, MEG=1e6, K=1e3, MIL=25.4e-6, M=1e-3, U=1e-6,
// N=1e-9, P=1e-12, F=1e-15, in any case; letters after the scale factor are ignored.
import { describe, expect, test } from 'vitest';
import { readSpiceNumber, isAmbiguousNumber } from '@pnlint/grammar';

/** Relative comparison: the products below are not exact in binary floating point. */
function expectClose(actual: number | undefined, expected: number): void {
  expect(actual).toBeDefined();
  expect(Math.abs(actual! - expected)).toBeLessThanOrEqual(Math.abs(expected) * 1e-12);
}

describe('scale factors (SPICE3 user\'s manual, Quarles 1989)', () => {
  const table: [string, number][] = [
    ['1T', 1e12],
    ['1G', 1e9],
    ['1MEG', 1e6],
    ['1K', 1e3],
    ['1MIL', 25.4e-6],
    ['1M', 1e-3],
    ['1U', 1e-6],
    ['1N', 1e-9],
    ['1P', 1e-12],
    ['1F', 1e-15],
  ];
  for (const [text, value] of table) {
    test(`${text} = ${value}, in upper and lower case`, () => {
      expectClose(readSpiceNumber(text)?.value, value);
      expectClose(readSpiceNumber(text.toLowerCase())?.value, value);
    });
  }

  test('M is milli and MEG is mega, in any case (SPICE3 user\'s manual, Quarles 1989)', () => {
    expectClose(readSpiceNumber('1m')?.value, 1e-3);
    expectClose(readSpiceNumber('1Meg')?.value, 1e6);
    expectClose(readSpiceNumber('1mEg')?.value, 1e6);
    expectClose(readSpiceNumber('2.2M')?.value, 2.2e-3);
  });

  test('exponents, signs and leading dots (SPICE3 user\'s manual, Quarles 1989: 1e-14, 1.0E-14, .5)', () => {
    expectClose(readSpiceNumber('1e-14')?.value, 1e-14);
    expectClose(readSpiceNumber('1.0E-14')?.value, 1e-14);
    expectClose(readSpiceNumber('.5')?.value, 0.5);
    expectClose(readSpiceNumber('-5')?.value, -5);
    expectClose(readSpiceNumber('+3.3')?.value, 3.3);
    expectClose(readSpiceNumber('2.5e3k')?.value, 2.5e6);
  });

  test('letters after the scale factor are ignored: 10kOhm, 1uF, 5V (SPICE3 user\'s manual, Quarles 1989)', () => {
    expectClose(readSpiceNumber('10kOhm')?.value, 10e3);
    expectClose(readSpiceNumber('1uF')?.value, 1e-6);
    expectClose(readSpiceNumber('5V')?.value, 5);
    expect(readSpiceNumber('10kOhm')?.ignored).toBe('Ohm');
  });

  test('a unit letter that is itself a scale factor scales: 1F is a femto, not a farad (SPICE3 user\'s manual, Quarles 1989)', () => {
    expectClose(readSpiceNumber('1F')?.value, 1e-15);
    expectClose(readSpiceNumber('100mA')?.value, 0.1);
  });

  test('4k7 and 22x0k read as 4k and 22 by SPICE engines (ngspice 39 reads the number and ignores the rest)', () => {
    expectClose(readSpiceNumber('4k7')?.value, 4e3);
    expectClose(readSpiceNumber('22x0k')?.value, 22);
    expect(isAmbiguousNumber(readSpiceNumber('4k7')!)).toBe(true);
    expect(isAmbiguousNumber(readSpiceNumber('4.7k')!)).toBe(false);
  });

  test('a word that is no number reads as undefined', () => {
    expect(readSpiceNumber('out')).toBeUndefined();
    expect(readSpiceNumber('k1')).toBeUndefined();
    expect(readSpiceNumber('-')).toBeUndefined();
  });
});

describe('scaled values are the correctly rounded decimal value', () => {
  // Reference: ECMAScript Number() of the equivalent decimal text, which is correctly rounded
  // (ECMA-262, "StringToNumber"); e.g. 10u is exactly the double nearest 1e-5.
  const EXPONENTS: Record<string, number> = { t: 12, g: 9, meg: 6, k: 3, m: -3, u: -6, n: -9, p: -12, f: -15 };
  test('10u is 1e-5 exactly, 4.7k is 4700, 0.1u is 1e-7', () => {
    expect(readSpiceNumber('10u')!.value).toBe(1e-5);
    expect(readSpiceNumber('4.7k')!.value).toBe(4700);
    expect(readSpiceNumber('0.1u')!.value).toBe(1e-7);
    expect(readSpiceNumber('-2.2n')!.value).toBe(-2.2e-9);
  });

  test('random mantissas and scale factors', async () => {
    const fc = (await import('fast-check')).default;
    fc.assert(
      fc.property(
        fc.stringMatching(/^[+-]?(\d{1,18}(\.\d{0,6})?|\.\d{1,6})(e[+-]?\d{1,2})?$/),
        fc.constantFrom(...Object.keys(EXPONENTS)),
        (mantissa, scale) => {
          const [digits, written = '0'] = mantissa.split('e');
          const expected = Number(`${digits}e${Number(written) + EXPONENTS[scale]!}`);
          expect(readSpiceNumber(mantissa + scale)!.value).toBe(expected);
        },
      ),
      { numRuns: 2000 },
    );
  });
});

describe('readSpiceValue, the parser\'s value-only path', () => {
  test('gives readSpiceNumber\'s value for any word (whose values are checked against the manual above)', async () => {
    const { readSpiceValue } = await import('@pnlint/grammar');
    const fc = (await import('fast-check')).default;
    const word = fc
      .array(fc.constantFrom('0', '1', '4', '7', '9', '.', '+', '-', 'e', 'E', 'k', 'K', 'm', 'M', 'meg', 'Meg', 'mil', 'u', 'n', 'p', 'f', 'g', 't', 'x', 'Ohm', 'F', 'V', 'A', '_'), { maxLength: 8 })
      .map((parts) => parts.join(''));
    fc.assert(
      fc.property(word, (text) => {
        expect(Object.is(readSpiceValue(text), readSpiceNumber(text)?.value), text).toBe(true);
      }),
      { numRuns: 5000 },
    );
  });
});
