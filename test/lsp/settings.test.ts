// The editor's pnlint.* settings onto the core's Settings: values as the extension
// declares them, defaults for anything missing or senseless, and restricted mode that
// a setting can switch on but never off.
import { describe, expect, it } from 'vitest';
import { DEFAULT_SETTINGS } from '../../server/src/settings.js';
import { DEFAULT_DEBOUNCE_MILLISECONDS, readServerSettings } from '../../server/src/lsp/settings.js';

describe('settings mapping', () => {
  it('maps every setting the extension declares', () => {
    const logs: string[] = [];
    const mapped = readServerSettings(
      {
        severity: { 'zener-underbiased': 'error', 'shared-led-resistor': 'off' },
        supplyTolerance: 0.1,
        resistorTolerance: '1%',
        defaultResistorPower: 0.125,
        preferredSeries: 'e96',
        deratingMargin: 0.7,
        temperatures: [-40, 85],
        debounceMilliseconds: 300,
      },
      false,
      (line) => logs.push(line),
    );
    expect(mapped.core).toEqual({
      severities: { 'zener-underbiased': 'error', 'shared-led-resistor': 'off' },
      supplyTolerance: 0.1,
      resistorTolerance: 0.01,
      defaultResistorPower: 0.125,
      preferredSeries: 'E96',
      deratingMargin: 0.7,
      temperatures: [-40, 85],
      restricted: false,
    });
    expect(mapped.debounceMilliseconds).toBe(300);
    expect(logs).toEqual([]);
  });

  it('keeps the defaults for a missing section and logs each value it cannot use', () => {
    expect(readServerSettings(undefined, false, () => {}).core).toEqual(DEFAULT_SETTINGS);
    expect(readServerSettings(null, false, () => {}).debounceMilliseconds).toBe(DEFAULT_DEBOUNCE_MILLISECONDS);
    const logs: string[] = [];
    const mapped = readServerSettings(
      { severity: { 'reversed-diode': 'loud' }, supplyTolerance: 5, deratingMargin: 0, preferredSeries: 'E7', temperatures: [-300], debounceMilliseconds: -1, defaultResistorPower: 0 },
      false,
      (line) => logs.push(line),
    );
    // 5 is a percentage typed as a fraction: a tolerance of 500 % makes no sense (bounds in settings.ts).
    expect(mapped.core.supplyTolerance).toBe(DEFAULT_SETTINGS.supplyTolerance);
    expect(mapped.core.deratingMargin).toBe(DEFAULT_SETTINGS.deratingMargin);
    expect(mapped.core.preferredSeries).toBe(DEFAULT_SETTINGS.preferredSeries);
    // −300 °C is below absolute zero (−273.15 °C).
    expect(mapped.core.temperatures).toEqual([]);
    expect(mapped.core.severities).toEqual({});
    expect(mapped.core.defaultResistorPower).toBe(DEFAULT_SETTINGS.defaultResistorPower);
    expect(mapped.debounceMilliseconds).toBe(DEFAULT_DEBOUNCE_MILLISECONDS);
    expect(logs).toHaveLength(7);
  });

  it('restricted mode from the client stays on whatever the settings say', () => {
    expect(readServerSettings({ restricted: false }, true, () => {}).core.restricted).toBe(true);
    expect(readServerSettings({ restricted: true }, false, () => {}).core.restricted).toBe(true);
    expect(readServerSettings({}, false, () => {}).core.restricted).toBe(false);
  });
});
