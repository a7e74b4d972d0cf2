// Element readers: one place that knows, per element letter, how many nodes a
// line has and what follows them. Each reader returns the element, or an
// UnmodeledElement with its reason, or undefined when the line is too broken to
// place in the circuit (a diagnostic then says why).
import type { ElementStatement, Field, Span, WordField } from '@pnlint/grammar';
import type { Capacitor, Diode, Element, Inductor, Model, SourceLocation, UnmodeledElement, Waveform } from './circuit.js';
import type { DiagnosticSink } from './diagnostics.js';
import { describeModelType, isSimulatedModel, MODEL_TYPES_BY_LETTER } from './models.js';
import { buildWaveform, valueAtTimeZero, WAVEFORM_ARGUMENTS, WAVEFORM_REQUIRED, WAVEFORM_SHAPES, type TransientTimes, type WaveformShape } from './waveforms.js';

/** What a reader needs from the place the element line sits in. */
export interface ElementContext {
  /** Hierarchical name: `D1`, `X2.D1`. */
  name: string;
  /** Prefix of names in this scope (`X2.`, or empty): applied to controlling sources and inductors named on the line. */
  prefix: string;
  location: SourceLocation;
  instances: SourceLocation[];
  uri: string;
  sink: DiagnosticSink;
  /** The circuit node a node field names (ground folded, ports mapped, hierarchy applied). */
  node(field: NodeField): string;
  /** Evaluates a value field; `letter` picks the reading of an ambiguous number. Undefined after a diagnostic. */
  value(field: Field, letter: string): number | undefined;
  /** A `.model` visible from here, by name as written. */
  model(name: string): Model | undefined;
  options: Record<string, number>;
  /** Circuit temperature, °C (for `dtemp=`). */
  temperature: number;
  times: TransientTimes;
}

export type NodeField = Extract<Field, { kind: 'word' | 'number' }>;

/** What ngspice 39 does with a resistor written without a value (and with 0 Ω): it uses 1 mΩ. */
export const RESISTANCE_WITHOUT_VALUE = 1e-3;
/** What ngspice 39 does with a capacitor or inductor written without a value: 0 (checked by running it). */
export const REACTANCE_WITHOUT_VALUE = 0;
/** MOSFET channel width and length when neither the line nor `.options defw/defl` gives one (ngspice DEFW/DEFL: 100 µm). */
export const DEFAULT_MOSFET_WIDTH = 100e-6;
export const DEFAULT_MOSFET_LENGTH = 100e-6;

const isNodeField = (field: Field | undefined): field is NodeField => field?.kind === 'word' || field?.kind === 'number';
const lower = (field: Field | undefined) => (field?.kind === 'word' ? field.text.toLowerCase() : undefined);

type PositionalField = Exclude<Field, { kind: 'assign' }>;
type AssignField = Extract<Field, { kind: 'assign' }>;

interface SplitFields {
  positional: readonly PositionalField[];
  assigns: ReadonlyMap<string, AssignField>;
}

/** Shared by every line without `key=value` fields (most lines), so that they allocate no map. */
const NO_ASSIGNS: ReadonlyMap<string, AssignField> = new Map();

function split(fields: Field[]): SplitFields {
  // Most lines have no `key=value`: their fields are the positional ones, uncopied.
  let assignCount = 0;
  for (const field of fields) if (field.kind === 'assign') assignCount++;
  if (assignCount === 0) return { positional: fields as PositionalField[], assigns: NO_ASSIGNS };
  const positional: PositionalField[] = [];
  const assigns = new Map<string, AssignField>();
  for (const field of fields) {
    if (field.kind === 'assign') assigns.set(field.key.text.toLowerCase(), field);
    else positional.push(field);
  }
  return { positional, assigns };
}

// Elements are written out as whole object literals, the four common fields
// first, rather than spread from a shared base: a spread costs microseconds
// per element on a 40,000-element netlist, and leaves the object slower to read.

function unmodeled(context: ElementContext, statement: ElementStatement, nodes: string[], reason: string, missingDefinition?: string): UnmodeledElement {
  const element: UnmodeledElement = { name: context.name, nodes, location: context.location, instances: context.instances, type: 'unmodeled', letter: statement.letter, reason };
  if (missingDefinition !== undefined) element.missingDefinition = missingDefinition;
  return element;
}

/**
 * Reads the first `count` fields as nodes; reports and returns undefined when
 * there are fewer (or a field cannot be a node). `usage` shows the line's form.
 */
function readNodes(context: ElementContext, statement: ElementStatement, fields: readonly Field[], count: number, usage: string): string[] | undefined {
  const nodes: string[] = [];
  for (let i = 0; i < count; i++) {
    const field = fields[i];
    if (!isNodeField(field)) {
      const found = fields.slice(0, count).filter(isNodeField).length;
      context.sink.error(
        context.uri,
        statement.span,
        `${statement.name.text} has ${found} node${found === 1 ? '' : 's'} where ${count} are needed (${usage})`,
      );
      return undefined;
    }
    nodes.push(context.node(field));
  }
  return nodes;
}

function optionalNumber(context: ElementContext, field: Field | undefined, letter = ''): number | undefined {
  return field ? context.value(field, letter) : undefined;
}

/** Finds the model a D/Q/M/J/S/W line names; reports a missing one or one of the wrong type. */
function findModel(
  context: ElementContext,
  statement: ElementStatement,
  field: Field | undefined,
): { model: Model } | { reason: string; missingDefinition?: string } {
  const letter = statement.letter;
  const wanted = MODEL_TYPES_BY_LETTER[letter] ?? [];
  if (!isNodeField(field)) {
    const message = `${statement.name.text} names no model`;
    context.sink.error(context.uri, statement.span, message);
    return { reason: message };
  }
  const model = context.model(field.text);
  if (!model) {
    context.sink.report('warning', 'unknown-model', context.uri, field.span, `model ${field.text} not found: ${context.name} is not checked`, { element: context.name });
    return { reason: `model ${field.text} not found`, missingDefinition: field.text };
  }
  if (!wanted.includes(model.type)) {
    const message = `${model.name} is a ${describeModelType(model.type)} model, which a ${letter} element cannot use: ${context.name} is not checked`;
    context.sink.error(context.uri, field.span, message, {
      related: [{ location: model.location, message: `${model.name} is defined here` }],
    });
    return { reason: `${model.name} is a ${describeModelType(model.type)} model` };
  }
  return { model };
}

// ------------------------------------------------------------------ R, C, L

const PASSIVES = {
  R: { quantity: 'resistance', valueKeys: ['r', 'resistance'], modelValue: 'r', example: 'R1 a b 1k' },
  C: { quantity: 'capacitance', valueKeys: ['c', 'capacitance'], modelValue: 'cap', example: 'C1 a b 100n' },
  L: { quantity: 'inductance', valueKeys: ['l', 'inductance'], modelValue: 'ind', example: 'L1 a b 10u' },
} as const;

function readPassive(statement: ElementStatement, context: ElementContext): Element | undefined {
  const letter = statement.letter as 'R' | 'C' | 'L';
  const kind = PASSIVES[letter];
  const { positional, assigns } = split(statement.fields);
  const nodes = readNodes(context, statement, positional, 2, `two nodes and a value: ${kind.example}`);
  if (!nodes) return undefined;
  let value: number | undefined;
  let valueGiven = false;
  let model: Model | undefined;
  for (let index = 2; index < positional.length; index++) {
    const field = positional[index]!;
    if (field.kind === 'word') {
      const named = context.model(field.text);
      if (named && (MODEL_TYPES_BY_LETTER[letter] ?? []).includes(named.type)) {
        model = named;
        continue;
      }
    }
    if (!valueGiven && field.kind !== 'group') {
      value = context.value(field, letter);
      valueGiven = true;
      continue;
    }
    context.sink.warning(context.uri, field.span, `${field.kind === 'group' ? 'this list' : fieldText(field)} is not understood on a ${kind.quantity} line and is ignored`);
  }
  for (const key of kind.valueKeys) {
    const assign = assigns.get(key);
    if (assign && !valueGiven) {
      value = context.value(assign.value, letter);
      valueGiven = true;
    }
  }
  if (!valueGiven && model) {
    const fromModel = model.params[kind.modelValue];
    const sheet = model.params['rsh'];
    const length = optionalNumber(context, assigns.get('l')?.value);
    const width = optionalNumber(context, assigns.get('w')?.value) ?? model.params['defw'];
    if (fromModel !== undefined) {
      value = fromModel;
      valueGiven = true;
    } else if (letter === 'R' && sheet !== undefined && length !== undefined && width !== undefined) {
      // Semiconductor resistor: RSH · (L − SHORT) / (W − NARROW) (ngspice 39 manual).
      value = (sheet * (length - (model.params['short'] ?? 0))) / (width - (model.params['narrow'] ?? 0));
      valueGiven = true;
    }
  }
  if (!valueGiven) {
    const second = positional[1];
    const looksLikeValue = second?.kind === 'number' && /[a-z.]/i.test(second.text);
    const hint = looksLikeValue ? ` (if ${second.text} is meant as the value, a node is missing)` : '';
    const substitute =
      letter === 'R'
        ? 'SPICE engines substitute a tiny default (1 mΩ in ngspice)'
        : `SPICE engines substitute ${letter === 'C' ? '0 F' : '0 H'}`;
    context.sink.error(context.uri, statement.span, `${statement.name.text} has no ${kind.quantity} value; ${substitute}${hint}`);
  }
  if (valueGiven && value === undefined) return undefined; // the value's own diagnostic says why
  const multiplier = optionalNumber(context, assigns.get('m')?.value) ?? 1;
  if (multiplier <= 0) {
    context.sink.error(context.uri, assigns.get('m')!.span, `the multiplier m must be positive`);
    return undefined;
  }
  if (letter === 'R') {
    let resistance = value ?? RESISTANCE_WITHOUT_VALUE;
    if (valueGiven && resistance === 0) {
      context.sink.warning(context.uri, statement.span, `${statement.name.text} is 0 Ω; SPICE engines raise it to 1 mΩ (ngspice 39)`);
      resistance = RESISTANCE_WITHOUT_VALUE;
    }
    return { name: context.name, nodes, location: context.location, instances: context.instances, type: 'R', resistance: resistance / multiplier };
  }
  const initialCondition = optionalNumber(context, assigns.get('ic')?.value);
  if (letter === 'C') {
    const capacitor: Capacitor = { name: context.name, nodes, location: context.location, instances: context.instances, type: 'C', capacitance: (value ?? REACTANCE_WITHOUT_VALUE) * multiplier };
    if (initialCondition !== undefined) capacitor.initialCondition = initialCondition;
    return capacitor;
  }
  const inductor: Inductor = { name: context.name, nodes, location: context.location, instances: context.instances, type: 'L', inductance: (value ?? REACTANCE_WITHOUT_VALUE) / multiplier };
  if (initialCondition !== undefined) inductor.initialCondition = initialCondition;
  return inductor;
}

function fieldText(field: Field): string {
  switch (field.kind) {
    case 'word':
    case 'number':
    case 'expression':
      return field.text;
    case 'assign':
      return `${field.key.text}=`;
    case 'group':
      return field.name?.text ?? '(…)';
  }
}

// -------------------------------------------------------------------- V, I

const SOURCE_KEYWORDS = new Set(['dc', 'ac', 'distof1', 'distof2', ...WAVEFORM_SHAPES]);
/** Time behaviours that SPICE engines know and pnlint does not simulate: the DC value is used for them. */
const UNSIMULATED_WAVEFORMS = new Set(['am', 'trnoise', 'trrandom', 'external', 'file', 'port']);

function readSource(statement: ElementStatement, context: ElementContext): Element | undefined {
  const letter = statement.letter as 'V' | 'I';
  const fields = statement.fields;
  const nodes = readNodes(context, statement, fields, 2, `two nodes and a value: ${letter}1 a 0 DC 5`);
  if (!nodes) return undefined;
  const rest = fields.slice(2);
  let dc: number | undefined;
  let dcGiven = false;
  let acGiven = false;
  let waveform: Waveform | undefined;
  const isValue = (field: Field | undefined) =>
    field !== undefined && (field.kind === 'number' || field.kind === 'expression' || (field.kind === 'word' && !SOURCE_KEYWORDS.has(field.text.toLowerCase()) && !UNSIMULATED_WAVEFORMS.has(field.text.toLowerCase())));

  const setDc = (field: Field) => {
    if (dcGiven) {
      context.sink.warning(context.uri, field.span, `${statement.name.text} has a second DC value; SPICE engines use one, pnlint keeps the first`);
      return;
    }
    dc = context.value(field, letter);
    dcGiven = true;
  };
  const setWaveform = (shape: WaveformShape, args: Field[], span: Span) => {
    if (waveform) {
      context.sink.warning(context.uri, span, `${statement.name.text} has a second time behaviour; pnlint keeps the first`);
      return;
    }
    waveform = readWaveform(context, shape, args, span, letter);
  };

  for (let i = 0; i < rest.length; i++) {
    const field = rest[i]!;
    const keyword = lower(field);
    if (field.kind === 'group') {
      const shape = field.name?.text.toLowerCase();
      if (shape && (WAVEFORM_SHAPES as readonly string[]).includes(shape)) setWaveform(shape as WaveformShape, field.items, field.span);
      else if (shape && UNSIMULATED_WAVEFORMS.has(shape)) unsimulatedWaveform(context, field.name!);
      else if (shape === 'ac' || shape === 'distof1' || shape === 'distof2') acGiven = true;
      else context.sink.warning(context.uri, field.span, `${fieldText(field)} is not understood on a source line and is ignored`);
      continue;
    }
    if (field.kind === 'assign') {
      if (field.key.text.toLowerCase() === 'dc') setDc(field.value);
      continue; // other instance parameters (m=, r=, td= of PWL) do not change the DC value
    }
    if (keyword === 'dc') {
      const next = rest[i + 1];
      if (isValue(next)) {
        setDc(next!);
        i++;
      } else context.sink.error(context.uri, field.span, `DC needs a value after it`);
      continue;
    }
    if (keyword === 'ac' || keyword === 'distof1' || keyword === 'distof2') {
      // Small-signal magnitude and phase: no effect on the operating point.
      acGiven = true;
      for (let taken = 0; taken < 2 && isValue(rest[i + 1]); taken++) i++;
      continue;
    }
    if (keyword && (WAVEFORM_SHAPES as readonly string[]).includes(keyword)) {
      // Written without parentheses: the values up to the next keyword are its arguments.
      const group = rest[i + 1];
      if (group?.kind === 'group' && group.name === undefined) {
        setWaveform(keyword as WaveformShape, group.items, { start: field.span.start, end: group.span.end });
        i++;
        continue;
      }
      const args: Field[] = [];
      while (isValue(rest[i + 1])) args.push(rest[++i]!);
      const end = args.length > 0 ? args[args.length - 1]!.span.end : field.span.end;
      setWaveform(keyword as WaveformShape, args, { start: field.span.start, end });
      continue;
    }
    if (keyword && UNSIMULATED_WAVEFORMS.has(keyword)) {
      unsimulatedWaveform(context, field as WordField);
      while (isValue(rest[i + 1])) i++;
      continue;
    }
    if (!dcGiven && !waveform) {
      setDc(field); // a bare value is the DC value
      continue;
    }
    context.sink.warning(context.uri, field.span, `${fieldText(field)} is not understood on a source line and is ignored`);
  }
  if (dcGiven && dc === undefined) return undefined; // its own diagnostic says why
  if (!dcGiven && !waveform && !acGiven) {
    context.sink.info(context.uri, statement.span, `${statement.name.text} has no value; SPICE engines assume DC 0`);
  }
  const value = dcGiven ? dc! : waveform ? valueAtTimeZero(waveform) : 0;
  return { name: context.name, nodes, location: context.location, instances: context.instances, type: letter, dc: value, waveform };
}

function unsimulatedWaveform(context: ElementContext, word: WordField): void {
  context.sink.info(context.uri, word.span, `the ${word.text.toUpperCase()} time behaviour is not simulated; ${context.name} is taken at its DC value`);
}

function flattenArguments(fields: Field[]): Field[] {
  return fields.flatMap((field) => (field.kind === 'group' && field.name === undefined ? flattenArguments(field.items) : [field]));
}

function readWaveform(context: ElementContext, shape: WaveformShape, fields: Field[], span: Span, letter: string): Waveform | undefined {
  const name = shape.toUpperCase();
  const args: number[] = [];
  const written = flattenArguments(fields).filter((f) => f.kind !== 'assign');
  for (const field of written) {
    const value = context.value(field, letter);
    if (value === undefined) return undefined;
    args.push(value);
  }
  const most = WAVEFORM_ARGUMENTS[shape];
  if (args.length > most) {
    context.sink.warning(context.uri, span, `${name} takes at most ${most} values; the ${args.length - most} after them are ignored`);
    args.length = most;
  }
  if (args.length < WAVEFORM_REQUIRED[shape]) {
    context.sink.warning(context.uri, span, `${name} needs at least ${WAVEFORM_REQUIRED[shape]} values; the missing ones are taken as 0`);
  }
  if (shape === 'pwl') {
    if (args.length % 2 === 1) context.sink.warning(context.uri, span, `PWL takes time-value pairs; its last value has no pair and is ignored`);
    for (let i = 2; i + 1 < args.length; i += 2) {
      if (args[i]! < args[i - 2]!) {
        context.sink.warning(context.uri, span, `PWL times must not decrease (${args[i]} s comes after ${args[i - 2]} s)`);
        break;
      }
    }
  }
  return buildWaveform(shape, args, context.times);
}

// ------------------------------------------------------ E, G, F, H (linear)

/** Words and keys that turn a controlled source into a nonlinear or behavioural one. */
const BEHAVIOURAL_FORMS = new Set(['poly', 'value', 'table', 'laplace', 'freq', 'vol', 'cur', 'chebyshev']);

function behaviouralForm(fields: Field[]): string | undefined {
  for (const field of fields) {
    const word = field.kind === 'group' ? field.name?.text : field.kind === 'assign' ? field.key.text : field.kind === 'word' ? field.text : undefined;
    if (word && BEHAVIOURAL_FORMS.has(word.toLowerCase())) return word.toUpperCase();
  }
  return undefined;
}

function readControlled(statement: ElementStatement, context: ElementContext): Element | undefined {
  const letter = statement.letter as 'E' | 'G' | 'F' | 'H';
  const voltageControlled = letter === 'E' || letter === 'G';
  const { positional, assigns } = split(statement.fields);
  const form = behaviouralForm(statement.fields);
  if (form) {
    const outputs = positional.slice(0, 2).filter(isNodeField).map((f) => context.node(f));
    return unmodeled(context, statement, outputs, `${form} controlled sources are not simulated`);
  }
  const usage = voltageControlled ? `${letter}1 out+ out- in+ in- gain` : `${letter}1 out+ out- Vsense gain`;
  const nodes = readNodes(context, statement, positional, voltageControlled ? 4 : 2, usage);
  if (!nodes) return undefined;
  let index = voltageControlled ? 4 : 2;
  let controlSource: string | undefined;
  if (!voltageControlled) {
    const control = positional[index++];
    if (!isNodeField(control)) {
      context.sink.error(context.uri, statement.span, `${statement.name.text} names no controlling voltage source (${usage})`);
      return undefined;
    }
    controlSource = context.prefix + control.text;
  }
  const gainField = positional[index] ?? assigns.get('gain')?.value;
  if (!gainField) {
    context.sink.error(context.uri, statement.span, `${statement.name.text} has no gain (${usage})`);
    return undefined;
  }
  const gain = context.value(gainField, '');
  if (gain === undefined) return undefined;
  if (letter === 'E' || letter === 'G') return { name: context.name, nodes, location: context.location, instances: context.instances, type: letter, gain };
  return { name: context.name, nodes, location: context.location, instances: context.instances, type: letter, gain, controlSource: controlSource! };
}

// -------------------------------------------------------------------- S, W

function switchState(context: ElementContext, fields: Field[]): boolean | undefined {
  let state: boolean | undefined;
  for (const field of fields) {
    const word = lower(field);
    if (word === 'on') state = true;
    else if (word === 'off') state = false;
    else context.sink.warning(context.uri, field.span, `${fieldText(field)} is not understood on a switch line and is ignored`);
  }
  return state;
}

function readSwitch(statement: ElementStatement, context: ElementContext): Element | undefined {
  const letter = statement.letter as 'S' | 'W';
  const { positional } = split(statement.fields);
  const voltageControlled = letter === 'S';
  const usage = voltageControlled ? 'S1 n+ n- nc+ nc- SWMODEL [on|off]' : 'W1 n+ n- Vsense CSWMODEL [on|off]';
  const nodes = readNodes(context, statement, positional, voltageControlled ? 4 : 2, usage);
  if (!nodes) return undefined;
  let index = voltageControlled ? 4 : 2;
  let controlSource: string | undefined;
  if (!voltageControlled) {
    const control = positional[index++];
    if (!isNodeField(control)) {
      context.sink.error(context.uri, statement.span, `${statement.name.text} names no controlling voltage source (${usage})`);
      return undefined;
    }
    controlSource = context.prefix + control.text;
  }
  const found = findModel(context, statement, positional[index]);
  if ('reason' in found) return unmodeled(context, statement, nodes, found.reason, found.missingDefinition);
  const initiallyOn = switchState(context, positional.slice(index + 1));
  if (voltageControlled) return { name: context.name, nodes, location: context.location, instances: context.instances, type: 'S', model: found.model, initiallyOn };
  return { name: context.name, nodes, location: context.location, instances: context.instances, type: 'W', model: found.model, controlSource: controlSource!, initiallyOn };
}

// ------------------------------------------------------------ D, Q, M, J

/**
 * `m=` on a diode or bipolar transistor: that many devices in parallel, which at DC is the same
 * as multiplying the area. `area` has the multiplier folded in; `multiplier` is `m` alone.
 */
function areaOf(context: ElementContext, positionalArea: Field | undefined, assigns: SplitFields['assigns']): { area: number; multiplier: number } | undefined {
  const areaField = assigns.get('area')?.value ?? positionalArea;
  const area = areaField ? context.value(areaField, '') : 1;
  const multiplier = optionalNumber(context, assigns.get('m')?.value) ?? 1;
  if (area === undefined) return undefined;
  if (area <= 0 || multiplier <= 0) {
    context.sink.error(context.uri, (areaField ?? assigns.get('m'))!.span, `the area and the multiplier m must be positive`);
    return undefined;
  }
  return { area: area * multiplier, multiplier };
}

/** True when a field from `start` on is the word `flag`. */
function hasFlag(fields: readonly Field[], flag: string, start = 0): boolean {
  for (let index = start; index < fields.length; index++) if (lower(fields[index]) === flag) return true;
  return false;
}

function readDiode(statement: ElementStatement, context: ElementContext): Element | undefined {
  const { positional, assigns } = split(statement.fields);
  const nodes = readNodes(context, statement, positional, 2, 'D1 anode cathode MODEL [area]');
  if (!nodes) return undefined;
  const found = findModel(context, statement, positional[2]);
  if ('reason' in found) return unmodeled(context, statement, nodes, found.reason, found.missingDefinition);
  const areaField = positional[3]?.kind === 'word' && lower(positional[3]) === 'off' ? undefined : positional[3];
  if (areaField) {
    // SPICE3 takes a bare area after the model; ngspice 39 stops on it ("could not find a valid modelname", checked by running it).
    context.sink.warning(context.uri, areaField.span, `ngspice does not accept a bare area on a diode line; write area=${fieldText(areaField)}`);
  }
  const sized = areaOf(context, areaField, assigns);
  if (sized === undefined) return undefined;
  const temperatureField = assigns.get('temp')?.value;
  const offset = optionalNumber(context, assigns.get('dtemp')?.value);
  const temperature = temperatureField ? context.value(temperatureField, '') : offset !== undefined ? context.temperature + offset : undefined;
  const initialCondition = optionalNumber(context, assigns.get('ic')?.value);
  const diode: Diode = {
    name: context.name,
    nodes,
    location: context.location,
    instances: context.instances,
    type: 'D',
    model: found.model,
    area: sized.area,
    off: hasFlag(positional, 'off', 3),
    temperature,
  };
  if (sized.multiplier !== 1) diode.multiplier = sized.multiplier;
  if (initialCondition !== undefined) diode.initialCondition = initialCondition;
  return diode;
}

function readBjt(statement: ElementStatement, context: ElementContext): Element | undefined {
  const { positional, assigns } = split(statement.fields);
  // A fourth word is the substrate node unless it names a model (ngspice 39 manual, BJT line).
  const fourth = positional[3];
  const fourthIsModel = isNodeField(fourth) && context.model(fourth.text) !== undefined;
  const fifthIsModel = isNodeField(positional[4]) && context.model((positional[4] as NodeField).text) !== undefined;
  const nodeCount = fourthIsModel ? 3 : fifthIsModel || (positional.length >= 5 && positional[4]?.kind === 'word') ? 4 : 3;
  const nodes = readNodes(context, statement, positional, nodeCount, 'Q1 collector base emitter [substrate] MODEL [area]');
  if (!nodes) return undefined;
  const found = findModel(context, statement, positional[nodeCount]);
  if ('reason' in found) return unmodeled(context, statement, nodes, found.reason, found.missingDefinition);
  const after = positional.slice(nodeCount + 1);
  const areaField = after[0] && lower(after[0]) !== 'off' ? after[0] : undefined;
  const sized = areaOf(context, areaField, assigns);
  if (sized === undefined) return undefined;
  return { name: context.name, nodes, location: context.location, instances: context.instances, type: 'Q', model: found.model, area: sized.area, off: hasFlag(after, 'off') };
}

function readMosfet(statement: ElementStatement, context: ElementContext): Element | undefined {
  const { positional, assigns } = split(statement.fields);
  // Three nodes and a model: the vertical power MOSFET form (VDMOS), which pnlint does not simulate.
  const fourth = positional[3];
  const threeNodeModel = isNodeField(fourth) ? context.model(fourth.text) : undefined;
  if (threeNodeModel) {
    const nodes = positional.slice(0, 3).filter(isNodeField).map((f) => context.node(f));
    if (threeNodeModel.type === 'VDMOS') return unmodeled(context, statement, nodes, `VDMOS power MOSFET models are not simulated`);
    context.sink.error(context.uri, statement.span, `${statement.name.text} has 3 nodes where 4 are needed (M1 drain gate source bulk MODEL)`);
    return undefined;
  }
  const nodes = readNodes(context, statement, positional, 4, 'M1 drain gate source bulk MODEL [w= l=]');
  if (!nodes) return undefined;
  const found = findModel(context, statement, positional[4]);
  if ('reason' in found) return unmodeled(context, statement, nodes, found.reason, found.missingDefinition);
  const model = found.model;
  if (!isSimulatedModel(model)) {
    return unmodeled(context, statement, nodes, `${model.name} is a level ${model.params['level']} MOSFET model; pnlint simulates level 1 only`);
  }
  const width = optionalNumber(context, assigns.get('w')?.value) ?? context.options['defw'] ?? DEFAULT_MOSFET_WIDTH;
  const length = optionalNumber(context, assigns.get('l')?.value) ?? context.options['defl'] ?? DEFAULT_MOSFET_LENGTH;
  const multiplier = optionalNumber(context, assigns.get('m')?.value) ?? 1;
  if (width <= 0 || length <= 0 || multiplier <= 0) {
    context.sink.error(context.uri, statement.span, `${statement.name.text}: w, l and m must be positive`);
    return undefined;
  }
  return { name: context.name, nodes, location: context.location, instances: context.instances, type: 'M', model, width, length, multiplier, off: hasFlag(positional, 'off', 5) };
}

// ------------------------------------------------------------------------ K

function readCoupling(statement: ElementStatement, context: ElementContext): Element | undefined {
  const { positional, assigns } = split(statement.fields);
  const first = positional[0];
  const second = positional[1];
  if (!isNodeField(first) || !isNodeField(second)) {
    context.sink.error(context.uri, statement.span, `${statement.name.text} needs two inductors and a coupling coefficient (K1 L1 L2 0.99)`);
    return undefined;
  }
  const coefficientField = positional[2] ?? assigns.get('k')?.value;
  if (!coefficientField) {
    context.sink.error(context.uri, statement.span, `${statement.name.text} has no coupling coefficient (K1 L1 L2 0.99)`);
    return undefined;
  }
  const coefficient = context.value(coefficientField, '');
  if (coefficient === undefined) return undefined;
  if (Math.abs(coefficient) > 1) {
    context.sink.error(context.uri, coefficientField.span, `a coupling coefficient lies between -1 and 1, not ${coefficient}`);
  }
  return { name: context.name, nodes: [], location: context.location, instances: context.instances, type: 'K', inductors: [context.prefix + first.text, context.prefix + second.text], coefficient };
}

// ------------------------------------------------------------- the others

/** What each element letter that pnlint does not simulate is, and how many nodes it has (undefined: all words but the last). */
const UNMODELED: Readonly<Record<string, { what: string; nodes: number | undefined }>> = {
  J: { what: 'junction field-effect transistors (J)', nodes: 3 },
  B: { what: 'behavioural sources (B)', nodes: 2 },
  A: { what: 'code models (A)', nodes: undefined },
  T: { what: 'lossless transmission lines (T)', nodes: 4 },
  O: { what: 'lossy transmission lines (O)', nodes: 4 },
  U: { what: 'uniform distributed RC lines (U)', nodes: 3 },
  Y: { what: 'single lossy transmission lines (Y)', nodes: 4 },
  P: { what: 'coupled multiconductor lines (P)', nodes: undefined },
  N: { what: 'compiled device models (N)', nodes: undefined },
  Z: { what: 'MESFETs (Z)', nodes: 3 },
};

function readUnmodeled(statement: ElementStatement, context: ElementContext): Element {
  const known = UNMODELED[statement.letter];
  const words = flattenArguments(statement.fields.filter((f) => f.kind !== 'assign')).filter(isNodeField);
  const count = known?.nodes ?? Math.max(0, words.length - 1);
  const nodes = words.slice(0, count).map((f) => context.node(f));
  const what = known?.what ?? `${statement.letter} elements`;
  return unmodeled(context, statement, nodes, `${what} are not simulated`);
}

/** Reads one element line (anything but X, which the elaborator expands). */
export function readElement(statement: ElementStatement, context: ElementContext): Element | undefined {
  switch (statement.letter) {
    case 'R':
    case 'C':
    case 'L':
      return readPassive(statement, context);
    case 'V':
    case 'I':
      return readSource(statement, context);
    case 'E':
    case 'G':
    case 'F':
    case 'H':
      return readControlled(statement, context);
    case 'S':
    case 'W':
      return readSwitch(statement, context);
    case 'D':
      return readDiode(statement, context);
    case 'Q':
      return readBjt(statement, context);
    case 'M':
      return readMosfet(statement, context);
    case 'K':
      return readCoupling(statement, context);
    default:
      return readUnmodeled(statement, context);
  }
}
