// User-tunable settings (`pnlint.*` in the editor, flags and pnlint.json for the CLI).
// Defaults are the trade's rules of thumb; each says where it comes from.
import type { Severity } from '@pnlint/grammar';

export type PreferredSeries = 'E6' | 'E12' | 'E24' | 'E48' | 'E96' | 'E192';

export interface Settings {
  /** Rule id → severity override, or 'off'. */
  severities: Record<string, Severity | 'off'>;
  /** Supply tolerance when no `*pnlint: supply` directive gives one: 5 % (common practice, no source). */
  supplyTolerance: number;
  /** Resistor tolerance when none is given; 0 means resistors are taken at their nominal value. */
  resistorTolerance: number;
  /** Power rating of a resistor without a `p=` rating: 0.25 W (common practice for through-hole parts, no source). */
  defaultResistorPower: number;
  /** Preferred number series for suggested values (IEC 60063). */
  preferredSeries: PreferredSeries;
  /** Keep reverse voltage below this fraction of the rating: 80 % (common practice, no source). */
  deratingMargin: number;
  /** Circuit temperatures (°C) to check at, in addition to the netlist's `.temp`. Empty: the netlist's only. */
  temperatures: number[];
  /** In an untrusted workspace, includes outside the workspace are not read. */
  restricted: boolean;
}

export const DEFAULT_SETTINGS: Settings = {
  severities: {},
  supplyTolerance: 0.05,
  resistorTolerance: 0,
  defaultResistorPower: 0.25,
  preferredSeries: 'E24',
  deratingMargin: 0.8,
  temperatures: [],
  restricted: false,
};
