// pnlint.json: what it holds (product.md: ratings per model or instance, supplies, settings
// overrides, ignores), and a diagnostic at the key for every mistake.
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Ajv } from 'ajv';
import { describe, expect, it } from 'vitest';
import { effectiveSettings, readWorkspaceConfig } from '../../server/src/config.js';
import { DEFAULT_SETTINGS } from '../../server/src/settings.js';

const read = (value: unknown) => readWorkspaceConfig('memory:/pnlint.json', typeof value === 'string' ? value : JSON.stringify(value, null, 2));

describe('pnlint.json', () => {
  it('reads ratings, supplies, settings and ignores', () => {
    const { config, findings } = read({
      $schema: './pnlint.schema.json',
      ratings: { DRED: { kind: 'led', if: '20m', vrrm: 5 }, R7: { p: 0.25, tol: '5%' } },
      supplies: { V1: { min: 4.75, max: 5.25 }, V2: { tol: '10%' } },
      settings: { supplyTolerance: 0.1, deratingMargin: 0.7, preferredSeries: 'E96', temperatures: [0, 70], severities: { 'zener-underbiased': 'error' } },
      ignore: ['shared-led-resistor', { rule: 'reversed-diode', elements: ['D3'], reason: 'blocks on purpose' }],
    });
    expect(findings).toEqual([]);
    expect(config.ratings[0]).toMatchObject({ target: 'DRED', kind: { value: 'led' }, values: { if: { value: 0.02 }, vrrm: { value: 5 } } });
    expect(config.ratings[1]!.values.tol?.value).toBeCloseTo(0.05, 12);
    expect(config.supplies).toMatchObject([{ source: 'V1', min: 4.75, max: 5.25 }, { source: 'V2', tolerance: 0.1 }]);
    expect(config.settings).toMatchObject({ supplyTolerance: 0.1, deratingMargin: 0.7, preferredSeries: 'E96', temperatures: [0, 70] });
    expect(config.suppressions).toMatchObject([{ rules: ['shared-led-resistor'] }, { rules: ['reversed-diode'], elements: ['D3'], reason: 'blocks on purpose' }]);
    const settings = effectiveSettings(DEFAULT_SETTINGS, config);
    expect(settings.severities['zener-underbiased']).toBe('error');
    expect(settings.supplyTolerance).toBe(0.1);
  });

  it('reports a JSON syntax error at its place, and never throws', () => {
    const { findings } = read('{\n  "ratings": {\n    "D1": { "if": 1, }\n  }\n}');
    expect(findings).toHaveLength(1);
    expect(findings[0]!.location.range.start.line).toBe(2);
    for (const text of ['', '[', '{"a":', '"\\u12"', '{"x": tru}', '\uFEFF{}', '{'.repeat(5000)]) expect(() => read(text)).not.toThrow();
    expect(read('\uFEFF{}').findings).toEqual([]);
  });

  it('reports unknown keys, bad values and unknown rule ids at their keys', () => {
    const text = JSON.stringify(
      {
        ratings: { D1: { vrm: 5, if: 'lots', kind: 'laser' } },
        supplies: { V1: { low: 1 } },
        settings: { deratingMargin: 3, preferredSeries: 'E7', nonsense: true, severities: { 'no-rule': 'error' } },
        ignore: ['no-such-rule'],
        extra: 1,
      },
      null,
      2,
    );
    const { findings } = read(text);
    const messages = findings.map((finding) => finding.message);
    expect(messages).toEqual([
      expect.stringContaining("Unknown rating key 'vrm'"),
      expect.stringContaining('Bad value for if'),
      expect.stringContaining('kind must be one of'),
      expect.stringContaining("Unknown supply key 'low'"),
      expect.stringContaining('deratingMargin must be a number'),
      expect.stringContaining('preferredSeries must be one of'),
      expect.stringContaining("Unknown setting 'nonsense'"),
      expect.stringContaining("Unknown rule id 'no-rule'"),
      expect.stringContaining("Unknown rule id 'no-such-rule'"),
      expect.stringContaining("Unknown key 'extra'"),
    ]);
    expect(findings.every((finding) => finding.rule === 'directive')).toBe(true);
    // "vrm" is on line 4 (0-based 3) of the pretty-printed text.
    expect(findings[0]!.location.range.start.line).toBe(3);
  });
});


describe('the shipped JSON schema agrees with the reader', () => {
  const schema = JSON.parse(readFileSync(fileURLToPath(new URL('../../server/schemas/pnlint.schema.json', import.meta.url)), 'utf8'));
  const validate = new Ajv({ allErrors: true, strict: false }).compile(schema);
  const good = [
    { ratings: { DRED: { kind: 'led', if: '20m', vrrm: 5, pd: '75mW' }, R7: { p: 0.25, tol: '5%' } } },
    { supplies: { V1: { min: 4.75, max: 5.25 }, V2: { tol: 0.1 } } },
    { settings: { preferredSeries: 'E96', severities: { 'reversed-diode': 'off' }, temperatures: [-20, 85] } },
    { ignore: ['shared-led-resistor', { rule: 'reversed-diode', elements: ['D3'], reason: 'on purpose' }] },
  ];
  const bad = [
    { ratings: { D1: { vrm: 5 } } },
    { ratings: { D1: { kind: 'laser' } } },
    { supplies: { V1: { tol: '5%', max: 5 } } },
    { settings: { preferredSeries: 'E7' } },
    { ignore: ['no-such-rule'] },
    { extra: true },
  ];
  it('accepts what the reader accepts', () => {
    for (const value of good) {
      expect(read(value).findings, JSON.stringify(value)).toEqual([]);
      expect(validate(value), JSON.stringify(validate.errors)).toBe(true);
    }
  });
  it('rejects what the reader rejects', () => {
    for (const value of bad) {
      expect(read(value).findings.length, JSON.stringify(value)).toBeGreaterThan(0);
      expect(validate(value), JSON.stringify(value)).toBe(false);
    }
  });
  it('lists every rule id the project knows', async () => {
    const { RULE_IDS } = await import('../../server/src/rule-ids.js');
    expect(new Set(schema.properties.ignore.items.anyOf[0].enum)).toEqual(new Set(RULE_IDS));
  });
});
