// Ratings and kinds, merged in issue 4's order (later wins): the generic part-class
// library → the model's BV → pnlint.json (model, then instance) → `*pnlint: rating` on the
// model → on the instance. Each value keeps where it came from.
import type { Circuit, Diode, Resistor } from '../netlist/circuit.js';
import type { WorkspaceConfig } from '../config.js';
import type { Settings } from '../settings.js';
import { formatPercent, formatQuantity } from '../units.js';
import type { Directives, RatedValue, RatingAssignment } from './directives.js';
import { PART_CLASSES } from './library.js';
import { describeLine, type ValueSource } from './provenance.js';
import { KIND_NAMES, RATING_SYMBOLS, type DiodeKind, type DiodeRatingKey, type RatingKey } from './vocabulary.js';

export type DiodeRatings = Partial<Record<DiodeRatingKey, RatedValue>>;

export interface ResistorRatings {
  power: RatedValue;
  tolerance?: RatedValue;
}

/** Rating layers for one element, in merge order. */
interface Layer {
  kind?: { value: DiodeKind; source: ValueSource };
  values: Partial<Record<RatingKey, RatedValue>>;
}

/** The pnlint.json and directive layers that apply to a diode, model first, instance last. */
function diodeLayers(circuit: Circuit, diode: Diode, directives: Directives, config: WorkspaceConfig | undefined): Layer[] {
  const modelName = diode.model.name.toLowerCase();
  const modelKey = [...circuit.models.entries()].find(([, model]) => model === diode.model)?.[0] ?? modelName;
  const layers: Layer[] = [];
  const fromConfig = (name: string) => config?.ratings.filter((rating) => rating.target.toLowerCase() === name) ?? [];
  layers.push(...fromConfig(modelName), ...fromConfig(diode.name.toLowerCase()));
  const fromDirectives = (match: (assignment: RatingAssignment) => boolean) => directives.ratings.filter(match);
  layers.push(...fromDirectives((each) => each.target.kind === 'model' && each.target.key === modelKey));
  layers.push(...fromDirectives((each) => each.target.kind === 'element' && each.target.name === diode.name));
  return layers;
}

/** The kind given by a directive or pnlint.json, if any (the instance's wins over the model's). */
export function declaredKind(
  circuit: Circuit,
  diode: Diode,
  directives: Directives,
  config: WorkspaceConfig | undefined,
): { value: DiodeKind; source: ValueSource } | undefined {
  let kind: { value: DiodeKind; source: ValueSource } | undefined;
  for (const layer of diodeLayers(circuit, diode, directives, config)) if (layer.kind) kind = layer.kind;
  return kind;
}

export function diodeRatings(
  circuit: Circuit,
  diode: Diode,
  kind: DiodeKind,
  directives: Directives,
  config: WorkspaceConfig | undefined,
): DiodeRatings {
  const ratings: DiodeRatings = {};
  const partClass = PART_CLASSES[kind];
  for (const [key, value] of Object.entries(partClass.ratings) as [DiodeRatingKey, number][]) {
    const ruleOfThumb = partClass.rulesOfThumb?.includes(key) ?? false;
    ratings[key] = {
      value,
      source: ruleOfThumb
        ? { origin: 'rule-of-thumb', description: `rule of thumb for ${KIND_NAMES[kind]}s` }
        : { origin: 'library', description: `typical value for ${partClass.description}` },
    };
  }
  // The model's BV: the reverse limit of a diode, the zener voltage of a zener.
  const breakdown = diode.model.params['bv'];
  if (breakdown !== undefined && breakdown > 0) {
    const source: ValueSource = {
      origin: 'model',
      description: `from BV of model ${diode.model.name} (${describeLine(diode.model.location, circuit.uri)})`,
      location: diode.model.location,
    };
    ratings[kind === 'zener' ? 'vz' : 'vrrm'] = { value: breakdown, source };
  }
  for (const layer of diodeLayers(circuit, diode, directives, config)) {
    for (const [key, rated] of Object.entries(layer.values) as [RatingKey, RatedValue][]) {
      if (key !== 'p' && key !== 'tol') ratings[key] = rated;
    }
  }
  return ratings;
}

export function resistorRatings(
  resistor: Resistor,
  settings: Settings,
  directives: Directives,
  config: WorkspaceConfig | undefined,
): ResistorRatings {
  const ratings: ResistorRatings = {
    power: {
      value: settings.defaultResistorPower,
      source: { origin: 'setting', description: 'default resistor power rating (setting)' },
    },
  };
  if (settings.resistorTolerance > 0) {
    ratings.tolerance = {
      value: settings.resistorTolerance,
      source: { origin: 'setting', description: 'default resistor tolerance (setting)' },
    };
  }
  const name = resistor.name.toLowerCase();
  const layers: Layer[] = [
    ...(config?.ratings.filter((rating) => rating.target.toLowerCase() === name) ?? []),
    ...directives.ratings.filter((each) => each.target.kind === 'element' && each.target.name === resistor.name),
  ];
  for (const layer of layers) {
    if (layer.values.p) ratings.power = layer.values.p;
    if (layer.values.tol) ratings.tolerance = layer.values.tol;
  }
  return ratings;
}

/** "VRRM 25 V from directive on line 3", "IF 20 mA (rule of thumb for LEDs)". */
export function describeRating(key: RatingKey, rated: RatedValue): string {
  const { symbol, unit } = RATING_SYMBOLS[key];
  const value = key === 'tol' ? formatPercent(rated.value) : formatQuantity(rated.value, unit);
  const source = rated.source.description;
  const joined = source.startsWith('from ') ? ` ${source}` : ` (${source})`;
  return `${symbol} ${value}${joined}`;
}
