// The editor's `pnlint.*` settings, mapped onto the core's Settings in this one place.
// Values that make no sense are dropped (with a log line) in favour of the default.
import type { Severity } from '@pnlint/grammar';
import { DEFAULT_SETTINGS, type PreferredSeries, type Settings } from '../settings.js';

/** How long to wait after the last keystroke before checking (ms): long enough to skip most of a burst of typing (common practice, no source). */
export const DEFAULT_DEBOUNCE_MILLISECONDS = 150;
const LONGEST_DEBOUNCE_MILLISECONDS = 10_000;

/** What the server runs with for one file: the core's settings and the editor-only ones. */
export interface ServerSettings {
  core: Settings;
  debounceMilliseconds: number;
}

/** The setting names under `pnlint.`, as the extension declares them in its package.json. */
export const SETTING_NAMES = [
  'severity',
  'supplyTolerance',
  'resistorTolerance',
  'defaultResistorPower',
  'preferredSeries',
  'deratingMargin',
  'temperatures',
  'debounceMilliseconds',
] as const;

const SEVERITIES: readonly (Severity | 'off')[] = ['error', 'warning', 'info', 'off'];
const SERIES: readonly PreferredSeries[] = ['E6', 'E12', 'E24', 'E48', 'E96', 'E192'];

/** A fraction: a number (0.05) or a percentage string ("5%"). */
function readFraction(value: unknown): number | undefined {
  if (typeof value === 'number') return Number.isFinite(value) ? value : undefined;
  if (typeof value === 'string') {
    const match = /^\s*([+-]?\d+(?:\.\d*)?|\.\d+)\s*%\s*$/.exec(value);
    if (match) return Number(match[1]) / 100;
    const plain = Number(value);
    return value.trim() !== '' && Number.isFinite(plain) ? plain : undefined;
  }
  return undefined;
}

function inRange(value: number | undefined, low: number, high: number): number | undefined {
  return value !== undefined && value >= low && value <= high ? value : undefined;
}

/**
 * Maps the client's `pnlint` section onto ServerSettings. `restricted` comes from the
 * client (untrusted workspace) and can only be switched on here, never off.
 */
export function readServerSettings(section: unknown, restricted: boolean, log: (message: string) => void): ServerSettings {
  const raw = (section && typeof section === 'object' ? section : {}) as Record<string, unknown>;
  const core: Settings = { ...DEFAULT_SETTINGS, severities: {}, temperatures: [], restricted };
  const reject = (name: string, value: unknown, expected: string) => {
    if (value !== undefined && value !== null) log(`setting pnlint.${name} = ${JSON.stringify(value)} ignored: expected ${expected}`);
  };

  const severity = raw['severity'];
  if (severity && typeof severity === 'object') {
    for (const [rule, level] of Object.entries(severity as Record<string, unknown>)) {
      if (typeof level === 'string' && (SEVERITIES as readonly string[]).includes(level)) core.severities[rule] = level as Severity | 'off';
      else reject(`severity.${rule}`, level, `one of ${SEVERITIES.join(', ')}`);
    }
  } else reject('severity', severity, 'an object of rule id → level');

  const fraction = (name: string, low: number, high: number): number | undefined => {
    const value = inRange(readFraction(raw[name]), low, high);
    if (value === undefined) reject(name, raw[name], `a fraction from ${low} to ${high} (or a percentage such as "5%")`);
    return value;
  };
  // Bounds: a supply or resistor tolerance beyond 50 % is surely a mistyped percentage.
  core.supplyTolerance = fraction('supplyTolerance', 0, 0.5) ?? DEFAULT_SETTINGS.supplyTolerance;
  core.resistorTolerance = fraction('resistorTolerance', 0, 0.5) ?? DEFAULT_SETTINGS.resistorTolerance;
  core.deratingMargin = fraction('deratingMargin', 0.01, 1) ?? DEFAULT_SETTINGS.deratingMargin;

  const power = raw['defaultResistorPower'];
  if (typeof power === 'number' && Number.isFinite(power) && power > 0) core.defaultResistorPower = power;
  else reject('defaultResistorPower', power, 'a power in watts above 0');

  const series = raw['preferredSeries'];
  const seriesName = typeof series === 'string' ? SERIES.find((name) => name.toLowerCase() === series.trim().toLowerCase()) : undefined;
  if (seriesName) core.preferredSeries = seriesName;
  else reject('preferredSeries', series, SERIES.join(', '));

  const temperatures = raw['temperatures'];
  // −273.15 °C is absolute zero; above a few hundred °C no board survives.
  if (Array.isArray(temperatures) && temperatures.every((t) => typeof t === 'number' && Number.isFinite(t) && t > -273.15 && t < 1000)) {
    core.temperatures = temperatures as number[];
  } else reject('temperatures', temperatures, 'a list of temperatures in °C');

  const debounce = raw['debounceMilliseconds'];
  let debounceMilliseconds = DEFAULT_DEBOUNCE_MILLISECONDS;
  if (typeof debounce === 'number' && Number.isFinite(debounce) && debounce >= 0 && debounce <= LONGEST_DEBOUNCE_MILLISECONDS) debounceMilliseconds = debounce;
  else reject('debounceMilliseconds', debounce, `a delay from 0 to ${LONGEST_DEBOUNCE_MILLISECONDS} ms`);

  if (raw['restricted'] === true) core.restricted = true;
  return { core, debounceMilliseconds };
}
