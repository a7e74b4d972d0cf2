// pnlint.json: the folder's ratings, supply ranges, settings and ignores (product.md).
// Pure: it reads text the caller has loaded. Every mistake is a finding at its own key,
// with rule `directive` (the file is the folder-wide form of the netlist directives).
import type { Severity } from '@pnlint/grammar';
import type { SourceLocation } from './netlist/circuit.js';
import type { Finding } from './findings.js';
import { RULE_IDS } from './rule-ids.js';
import type { PreferredSeries, Settings } from './settings.js';
import { readJson, type JsonMember, type JsonNode } from './checks/json-tree.js';
import { makeFinding } from './checks/finding.js';
import { readRatingValue, type ValueSource } from './checks/provenance.js';
import type { RatedValue } from './checks/directives.js';
import { DIODE_KINDS, RESISTOR_RATING_KEYS, DIODE_RATING_KEYS, isDiodeKind, type DiodeKind, type RatingKey } from './checks/vocabulary.js';

export const CONFIG_FILE_NAME = 'pnlint.json';

/** Ratings for one model or instance name (matched case-insensitively when a circuit is checked). */
export interface ConfigRating {
  target: string;
  kind?: { value: DiodeKind; source: ValueSource };
  values: Partial<Record<RatingKey, RatedValue>>;
}

export interface ConfigSupply {
  source: string;
  min?: number;
  max?: number;
  tolerance?: number;
  origin: ValueSource;
}

export interface ConfigSuppression {
  rules: string[];
  /** Only these element names (case-insensitive); every element when absent. */
  elements?: string[];
  reason?: string;
  location: SourceLocation;
}

export interface WorkspaceConfig {
  uri: string;
  ratings: ConfigRating[];
  supplies: ConfigSupply[];
  settings: Partial<Settings>;
  suppressions: ConfigSuppression[];
}

const PREFERRED_SERIES: readonly PreferredSeries[] = ['E6', 'E12', 'E24', 'E48', 'E96', 'E192'];
const SEVERITIES: readonly (Severity | 'off')[] = ['error', 'warning', 'info', 'off'];
const RATING_KEYS: readonly string[] = [...DIODE_RATING_KEYS, ...RESISTOR_RATING_KEYS];

/** Reads pnlint.json's text. Never throws; what cannot be read is left out and reported. */
export function readWorkspaceConfig(uri: string, text: string): { config: WorkspaceConfig; findings: Finding[] } {
  const config: WorkspaceConfig = { uri, ratings: [], supplies: [], settings: {}, suppressions: [] };
  const findings: Finding[] = [];
  const reading = readJson(text);
  if (!reading.ok) {
    findings.push(makeFinding('directive', 'error', `${CONFIG_FILE_NAME} is not valid JSON: ${reading.message}`, { uri, range: reading.range }));
    return { config, findings };
  }
  const at = (node: { range: JsonNode['range'] } | JsonMember): SourceLocation => ({
    uri,
    range: 'keyRange' in node ? node.keyRange : node.range,
  });
  const problem = (message: string, where: { range: JsonNode['range'] } | JsonMember) =>
    findings.push(makeFinding('directive', 'error', message, at(where)));
  const source = (where: JsonMember): ValueSource => ({ origin: 'config', description: `from ${CONFIG_FILE_NAME}`, location: at(where) });

  const root = reading.root;
  if (root.type !== 'object') {
    problem(`${CONFIG_FILE_NAME} must hold one JSON object.`, root);
    return { config, findings };
  }
  for (const member of root.members) {
    switch (member.key) {
      case '$schema':
        break;
      case 'ratings':
        forEachMember(member, problem, (target) => {
          const rating: ConfigRating = { target: target.key, values: {} };
          forEachMember(target, problem, (entry) => {
            const key = entry.key.toLowerCase();
            if (key === 'kind') {
              const kind = entry.value.type === 'string' ? entry.value.value.toLowerCase() : '';
              if (isDiodeKind(kind)) rating.kind = { value: kind, source: source(entry) };
              else problem(`kind must be one of ${DIODE_KINDS.join(', ')}.`, entry.value);
              return;
            }
            if (!RATING_KEYS.includes(key)) {
              problem(`Unknown rating key '${entry.key}': expected kind, ${RATING_KEYS.join(', ')}.`, entry);
              return;
            }
            const value = readNumberish(entry, key as RatingKey, problem);
            if (value !== undefined) rating.values[key as RatingKey] = { value, source: source(entry) };
          });
          config.ratings.push(rating);
        });
        break;
      case 'supplies':
        forEachMember(member, problem, (target) => {
          const supply: ConfigSupply = { source: target.key, origin: source(target) };
          forEachMember(target, problem, (entry) => {
            const key = entry.key.toLowerCase();
            if (key !== 'min' && key !== 'max' && key !== 'tol') {
              problem(`Unknown supply key '${entry.key}': expected min, max or tol.`, entry);
              return;
            }
            const value = readNumberish(entry, key, problem);
            if (value === undefined) return;
            if (key === 'tol') supply.tolerance = value;
            else supply[key] = value;
          });
          if (supply.tolerance !== undefined && (supply.min !== undefined || supply.max !== undefined)) {
            problem('Give either tol or min/max for a supply, not both.', target);
          } else if (supply.min !== undefined && supply.max !== undefined && supply.min > supply.max) {
            problem(`min (${supply.min}) is above max (${supply.max}).`, target);
          } else if (supply.tolerance !== undefined || supply.min !== undefined || supply.max !== undefined) {
            config.supplies.push(supply);
          }
        });
        break;
      case 'settings':
        forEachMember(member, problem, (entry) => readSetting(entry, config.settings, problem));
        break;
      case 'ignore':
        readIgnores(member, config, problem);
        break;
      default:
        problem(`Unknown key '${member.key}': expected ratings, supplies, settings or ignore.`, member);
    }
  }
  return { config, findings };
}

/** The settings a check runs with: the caller's, with pnlint.json's settings over them. */
export function effectiveSettings(settings: Settings, config: WorkspaceConfig | undefined): Settings {
  if (!config) return settings;
  return { ...settings, ...config.settings, severities: { ...settings.severities, ...(config.settings.severities ?? {}) } };
}

type Problem = (message: string, where: { range: JsonNode['range'] } | JsonMember) => void;

function forEachMember(member: JsonMember, problem: Problem, visit: (entry: JsonMember) => void): void {
  if (member.value.type !== 'object') {
    problem(`'${member.key}' must be an object.`, member.value);
    return;
  }
  for (const entry of member.value.members) visit(entry);
}

function readNumberish(entry: JsonMember, key: RatingKey | 'min' | 'max', problem: Problem): number | undefined {
  const node = entry.value;
  if (node.type !== 'number' && node.type !== 'string') {
    problem(`${entry.key} must be a number or a SPICE value such as "20m".`, node);
    return undefined;
  }
  const reading = readRatingValue(key, node.value);
  if ('problem' in reading) {
    problem(`Bad value for ${entry.key}: ${reading.problem}.`, node);
    return undefined;
  }
  return reading.value;
}

function readSetting(entry: JsonMember, settings: Partial<Settings>, problem: Problem): void {
  const node = entry.value;
  const fraction = (name: string, low: number, high: number): number | undefined => {
    if (node.type === 'number' && node.value >= low && node.value <= high) return node.value;
    problem(`${name} must be a number from ${low} to ${high}.`, node);
    return undefined;
  };
  switch (entry.key) {
    case 'supplyTolerance': {
      const value = fraction(entry.key, 0, 0.5);
      if (value !== undefined) settings.supplyTolerance = value;
      return;
    }
    case 'resistorTolerance': {
      const value = fraction(entry.key, 0, 0.5);
      if (value !== undefined) settings.resistorTolerance = value;
      return;
    }
    case 'deratingMargin': {
      const value = fraction(entry.key, 0.1, 1);
      if (value !== undefined) settings.deratingMargin = value;
      return;
    }
    case 'defaultResistorPower': {
      const value = readNumberish(entry, 'p', problem);
      if (value !== undefined) settings.defaultResistorPower = value;
      return;
    }
    case 'preferredSeries':
      if (node.type === 'string' && (PREFERRED_SERIES as readonly string[]).includes(node.value.toUpperCase())) {
        settings.preferredSeries = node.value.toUpperCase() as PreferredSeries;
      } else problem(`preferredSeries must be one of ${PREFERRED_SERIES.join(', ')}.`, node);
      return;
    case 'temperatures':
      if (node.type === 'array' && node.items.every((item) => item.type === 'number' && item.value >= -273.15 && item.value <= 1000)) {
        settings.temperatures = node.items.map((item) => (item as { value: number }).value);
      } else problem('temperatures must be a list of temperatures in °C.', node);
      return;
    case 'severities':
      if (node.type !== 'object') {
        problem('severities must be an object of rule id → error, warning, info or off.', node);
        return;
      }
      settings.severities = {};
      for (const rule of node.members) {
        if (!RULE_IDS.has(rule.key)) problem(`Unknown rule id '${rule.key}'.`, rule);
        else if (rule.value.type === 'string' && (SEVERITIES as readonly string[]).includes(rule.value.value)) {
          settings.severities[rule.key] = rule.value.value as Severity | 'off';
        } else problem(`Severity must be one of ${SEVERITIES.join(', ')}.`, rule.value);
      }
      return;
    default:
      problem(
        `Unknown setting '${entry.key}': expected supplyTolerance, resistorTolerance, defaultResistorPower, preferredSeries, deratingMargin, temperatures or severities.`,
        entry,
      );
  }
}

function readIgnores(member: JsonMember, config: WorkspaceConfig, problem: Problem): void {
  if (member.value.type !== 'array') {
    problem("'ignore' must be a list of rule ids or { \"rule\", \"elements\", \"reason\" } objects.", member.value);
    return;
  }
  for (const item of member.value.items) {
    const location: SourceLocation = { uri: config.uri, range: item.range };
    if (item.type === 'string') {
      if (RULE_IDS.has(item.value)) config.suppressions.push({ rules: [item.value], location });
      else problem(`Unknown rule id '${item.value}'.`, item);
      continue;
    }
    if (item.type !== 'object') {
      problem('Each ignore entry is a rule id or an object with "rule".', item);
      continue;
    }
    const suppression: ConfigSuppression = { rules: [], location };
    for (const field of item.members) {
      if (field.key === 'rule' && field.value.type === 'string') {
        if (RULE_IDS.has(field.value.value)) suppression.rules.push(field.value.value);
        else problem(`Unknown rule id '${field.value.value}'.`, field.value);
      } else if (field.key === 'elements' && field.value.type === 'array' && field.value.items.every((each) => each.type === 'string')) {
        suppression.elements = field.value.items.map((each) => (each as { value: string }).value);
      } else if (field.key === 'reason' && field.value.type === 'string') {
        suppression.reason = field.value.value;
      } else problem(`Unexpected '${field.key}' in an ignore entry: expected "rule" (a rule id), "elements" (a list of names), "reason".`, field);
    }
    if (suppression.rules.length > 0) config.suppressions.push(suppression);
  }
}
