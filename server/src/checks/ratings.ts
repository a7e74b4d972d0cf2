// Ratings and kinds, merged in issue 4's order (later wins): the generic part-class
// library → the model's BV → pnlint.json (model, then instance) → `*pnlint: rating` on the
// model → on the instance. Each value keeps where it came from.
import type { Circuit, Diode, Model, Resistor } from '../netlist/circuit.js';
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

/** The rating layers of pnlint.json and the directives, by target, built once per check. */
interface LayerIndex {
  /** pnlint.json ratings by lower-cased target (a model or an instance name). */
  config: Map<string, Layer[]>;
  /** Directive ratings on a model, by its key in `circuit.models`. */
  models: Map<string, Layer[]>;
  /** Directive ratings on an element, by its name as written. */
  elements: Map<string, Layer[]>;
}

const layerIndexes = new WeakMap<Directives, { config: WorkspaceConfig | undefined; index: LayerIndex }>();
/** Each model's key in `circuit.models`, per circuit. */
const modelKeys = new WeakMap<Circuit, Map<Model, string>>();

function push<K>(map: Map<K, Layer[]>, key: K, layer: Layer): void {
  const list = map.get(key);
  if (list) list.push(layer);
  else map.set(key, [layer]);
}

function layerIndex(directives: Directives, config: WorkspaceConfig | undefined): LayerIndex {
  const cached = layerIndexes.get(directives);
  if (cached && cached.config === config) return cached.index;
  const index: LayerIndex = { config: new Map(), models: new Map(), elements: new Map() };
  for (const rating of config?.ratings ?? []) push(index.config, rating.target.toLowerCase(), rating);
  for (const assignment of directives.ratings) {
    if (assignment.target.kind === 'model') push(index.models, assignment.target.key, assignment);
    else if (assignment.target.kind === 'element') push(index.elements, assignment.target.name, assignment);
  }
  layerIndexes.set(directives, { config, index });
  return index;
}

function modelKeyOf(circuit: Circuit, model: Model): string | undefined {
  let keys = modelKeys.get(circuit);
  if (!keys) {
    keys = new Map();
    // The first key of a model, as a search from the start would find it.
    for (const [key, each] of circuit.models) if (!keys.has(each)) keys.set(each, key);
    modelKeys.set(circuit, keys);
  }
  return keys.get(model);
}

/** The pnlint.json and directive layers that apply to a diode, model first, instance last. */
function diodeLayers(circuit: Circuit, diode: Diode, directives: Directives, config: WorkspaceConfig | undefined): Layer[] {
  const index = layerIndex(directives, config);
  const modelName = diode.model.name.toLowerCase();
  const modelKey = modelKeyOf(circuit, diode.model) ?? modelName;
  return [
    ...(index.config.get(modelName) ?? []),
    ...(index.config.get(diode.name.toLowerCase()) ?? []),
    ...(index.models.get(modelKey) ?? []),
    ...(index.elements.get(diode.name) ?? []),
  ];
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
  const index = layerIndex(directives, config);
  const layers: Layer[] = [...(index.config.get(resistor.name.toLowerCase()) ?? []), ...(index.elements.get(resistor.name) ?? [])];
  for (const layer of layers) {
    if (layer.values.p) ratings.power = layer.values.p;
    if (layer.values.tol) ratings.tolerance = layer.values.tol;
  }
  return ratings;
}

/** Texts of ratings already described: a board of a thousand diodes of one part repeats a few (ours: the bound keeps the editor's memory flat). */
const describedRatings = new Map<string, string>();
const MAXIMUM_DESCRIBED_RATINGS = 4096;

/** "VRRM 25 V from directive on line 3", "IF 20 mA (rule of thumb for LEDs)". */
export function describeRating(key: RatingKey, rated: RatedValue): string {
  const cacheKey = `${key}\u0000${rated.value}\u0000${rated.source.description}`;
  const known = describedRatings.get(cacheKey);
  if (known !== undefined) return known;
  if (describedRatings.size >= MAXIMUM_DESCRIBED_RATINGS) describedRatings.clear();
  const text = ratingText(key, rated);
  describedRatings.set(cacheKey, text);
  return text;
}

function ratingText(key: RatingKey, rated: RatedValue): string {
  const { symbol, unit } = RATING_SYMBOLS[key];
  const value = key === 'tol' ? formatPercent(rated.value) : formatQuantity(rated.value, unit);
  const source = rated.source.description;
  const joined = source.startsWith('from ') ? ` ${source}` : ` (${source})`;
  return `${symbol} ${value}${joined}`;
}

/** How many parts in parallel one diode line stands for (`m=`, 1 when not given): a datasheet rating applies to each part. */
export function partsInParallel(diode: Diode): number {
  const multiplier = diode.multiplier;
  return multiplier !== undefined && multiplier > 0 ? multiplier : 1;
}

/** A current or power of the whole line as each part carries it: "16.5 mA per part, m=2 (32.9 mA in all)", or "32.9 mA" for one part. */
export function formatPerPart(diode: Diode, total: number, unit: 'A' | 'W'): string {
  const parts = partsInParallel(diode);
  if (parts === 1) return formatQuantity(total, unit);
  return `${formatQuantity(total / parts, unit)} per part, m=${parts} (${formatQuantity(total, unit)} in all)`;
}
