// The `*pnlint: …` directives found in a netlist (product.md, "Directives inside a netlist"):
//   rating <model or instance> key=value …
//   supply <source> min=… max=… | tol=…
//   ignore <rule> … [-- reason]        (the next element line, or its own line when inline)
//   ignore-file <rule> … [-- reason]
// Every word that cannot be understood is itself a finding with rule `directive`.
import type { Range } from '@pnlint/grammar';
import type { Circuit, DirectiveComment, Element, SourceLocation } from '../netlist/circuit.js';
import type { Finding } from '../findings.js';
import { RULE_IDS } from '../rule-ids.js';
import { makeFinding } from './finding.js';
import { describeLine, readRatingValue, type ValueSource } from './provenance.js';
import {
  DIODE_KINDS,
  isDiodeKind,
  isDiodeRatingKey,
  isResistorRatingKey,
  type DiodeKind,
  type RatingKey,
} from './vocabulary.js';

/** What a rating applies to: a `.model` (its key in `circuit.models`) or one element. */
export type RatingTarget = { kind: 'model'; key: string } | { kind: 'element'; name: string };

export interface RatedValue {
  value: number;
  source: ValueSource;
}

export interface RatingAssignment {
  target: RatingTarget;
  kind?: { value: DiodeKind; source: ValueSource };
  values: Partial<Record<RatingKey, RatedValue>>;
}

/** A supply's range: min and/or max, or a tolerance around its netlist value. */
export interface SupplyRange {
  /** The independent source's element name. */
  source: string;
  min?: number;
  max?: number;
  tolerance?: number;
  origin: ValueSource;
}

export interface Suppression {
  rules: string[];
  /** The element it applies to (the next element line, or its own line when inline). */
  element?: string;
  /** The file it applies to, for `ignore-file`. */
  file?: string;
  reason?: string;
  location: SourceLocation;
}

export interface Directives {
  ratings: RatingAssignment[];
  supplies: SupplyRange[];
  suppressions: Suppression[];
  findings: Finding[];
}

interface Word {
  text: string;
  /** Offset in the directive's text. */
  start: number;
}

const DIRECTIVE = 'directive';

export function readDirectives(circuit: Circuit): Directives {
  const result: Directives = { ratings: [], supplies: [], suppressions: [], findings: [] };
  for (const directive of circuit.directives) readOne(circuit, directive, result);
  return result;
}

function readOne(circuit: Circuit, directive: DirectiveComment, result: Directives): void {
  const { words, reason } = splitWords(directive.text);
  const problem = (message: string, word?: Word) =>
    result.findings.push(makeFinding(DIRECTIVE, 'error', message, wordLocation(directive, word)));
  const command = words[0];
  if (!command) {
    problem('Empty pnlint directive: expected rating, supply, ignore or ignore-file.');
    return;
  }
  const source: ValueSource = {
    origin: 'directive',
    description: `from directive on ${describeLine(directive.location, circuit.uri)}`,
    location: directive.location,
  };
  switch (command.text.toLowerCase()) {
    case 'rating':
      readRating(circuit, directive, words.slice(1), source, problem, result);
      return;
    case 'supply':
      readSupply(circuit, directive, words.slice(1), source, problem, result);
      return;
    case 'ignore':
    case 'ignore-file':
      readIgnore(directive, command, words.slice(1), reason, problem, result);
      return;
    default:
      problem(`Unknown pnlint directive '${command.text}': expected rating, supply, ignore or ignore-file.`, command);
  }
}

type Problem = (message: string, word?: Word) => void;

function readRating(
  circuit: Circuit,
  directive: DirectiveComment,
  words: Word[],
  source: ValueSource,
  problem: Problem,
  result: Directives,
): void {
  const targetWord = words[0];
  if (!targetWord || targetWord.text.includes('=')) {
    problem('A rating directive needs a model or instance name first: *pnlint: rating D1 vrrm=50 if=1', targetWord);
    return;
  }
  const resolved = resolveRatingTarget(circuit, targetWord.text, directive.scope);
  if (!resolved) {
    problem(`No diode or resistor, and no diode model, is named '${targetWord.text}'.`, targetWord);
    return;
  }
  const assignment: RatingAssignment = { target: resolved.target, values: {} };
  for (const word of words.slice(1)) {
    const pair = splitPair(word);
    if (!pair) {
      problem(`Expected key=value, found '${word.text}'.`, word);
      continue;
    }
    const key = pair.key.toLowerCase();
    if (key === 'kind') {
      const kind = pair.value.toLowerCase();
      if (!resolved.isDiode) problem(`'kind' applies to diodes; '${targetWord.text}' is a resistor.`, word);
      else if (isDiodeKind(kind)) assignment.kind = { value: kind, source };
      else problem(`Unknown diode kind '${pair.value}': expected ${DIODE_KINDS.join(', ')}.`, word);
      continue;
    }
    const known = resolved.isDiode ? isDiodeRatingKey(key) : isResistorRatingKey(key);
    if (!known) {
      const expected = resolved.isDiode ? 'kind, vrrm, if, ifsm, pd, vz, izt, izk, izm' : 'p, tol';
      problem(`Unknown rating key '${pair.key}' for ${resolved.isDiode ? 'a diode' : 'a resistor'}: expected ${expected}.`, word);
      continue;
    }
    const reading = readRatingValue(key as RatingKey, pair.value);
    if ('problem' in reading) problem(`Bad value for ${key}: ${reading.problem}.`, word);
    else assignment.values[key as RatingKey] = { value: reading.value, source };
  }
  result.ratings.push(assignment);
}

function readSupply(
  circuit: Circuit,
  directive: DirectiveComment,
  words: Word[],
  source: ValueSource,
  problem: Problem,
  result: Directives,
): void {
  const targetWord = words[0];
  if (!targetWord || targetWord.text.includes('=')) {
    problem('A supply directive needs a source name first: *pnlint: supply V1 min=4.75 max=5.25', targetWord);
    return;
  }
  const element = findElement(circuit, targetWord.text, directive.scope);
  if (!element || (element.type !== 'V' && element.type !== 'I')) {
    problem(`No independent voltage or current source is named '${targetWord.text}'.`, targetWord);
    return;
  }
  const range: SupplyRange = { source: element.name, origin: source };
  for (const word of words.slice(1)) {
    const pair = splitPair(word);
    const key = pair?.key.toLowerCase();
    if (!pair || (key !== 'min' && key !== 'max' && key !== 'tol')) {
      problem(`Expected min=, max= or tol=, found '${word.text}'.`, word);
      continue;
    }
    const reading = readRatingValue(key, pair.value);
    if ('problem' in reading) {
      problem(`Bad value for ${key}: ${reading.problem}.`, word);
      continue;
    }
    if (key === 'tol') range.tolerance = reading.value;
    else range[key] = reading.value;
  }
  if (range.tolerance !== undefined && (range.min !== undefined || range.max !== undefined)) {
    problem('Give either tol= or min=/max= for a supply, not both.');
    return;
  }
  if (range.min !== undefined && range.max !== undefined && range.min > range.max) {
    problem(`min (${range.min}) is above max (${range.max}).`);
    return;
  }
  if (range.tolerance === undefined && range.min === undefined && range.max === undefined) {
    problem('A supply directive needs min=, max= or tol=.');
    return;
  }
  result.supplies.push(range);
}

function readIgnore(
  directive: DirectiveComment,
  command: Word,
  words: Word[],
  reason: string | undefined,
  problem: Problem,
  result: Directives,
): void {
  const wholeFile = command.text.toLowerCase() === 'ignore-file';
  const rules: string[] = [];
  for (const word of words) {
    for (const part of splitList(word)) {
      const id = part.text.toLowerCase();
      if (RULE_IDS.has(id)) rules.push(id);
      else problem(`Unknown rule id '${part.text}'.`, part);
    }
  }
  if (words.length === 0) {
    problem(`${command.text} needs the rule ids it applies to: *pnlint: ${command.text} reversed-diode`, command);
    return;
  }
  if (rules.length === 0) return;
  const suppression: Suppression = { rules, location: directive.location };
  if (reason) suppression.reason = reason;
  if (wholeFile) {
    suppression.file = directive.location.uri;
  } else if (directive.nextElement !== undefined) {
    suppression.element = directive.nextElement;
  } else {
    problem(`'${command.text}' applies to the next element line, and none follows.`, command);
    return;
  }
  result.suppressions.push(suppression);
}

/** Splits the directive's text into words with offsets; everything after ` -- ` is the reason. */
function splitWords(text: string): { words: Word[]; reason: string | undefined } {
  let body = text;
  let reason: string | undefined;
  const marker = /(^|\s)--(\s|$)/.exec(text);
  if (marker) {
    body = text.slice(0, marker.index);
    reason = text.slice(marker.index + marker[0].length).trim() || undefined;
  }
  const words: Word[] = [];
  for (const match of body.matchAll(/\S+/g)) words.push({ text: match[0], start: match.index });
  return { words, reason };
}

/** `a,b` → two words (rule lists may be written with commas). */
function splitList(word: Word): Word[] {
  const parts: Word[] = [];
  for (const match of word.text.matchAll(/[^,]+/g)) parts.push({ text: match[0], start: word.start + match.index });
  return parts;
}

function splitPair(word: Word): { key: string; value: string } | undefined {
  const at = word.text.indexOf('=');
  if (at <= 0 || at === word.text.length - 1) return undefined;
  return { key: word.text.slice(0, at), value: word.text.slice(at + 1) };
}

/**
 * The range of one word inside the directive, when the directive sits on one line and its
 * text ends where the range ends (how comments are recorded); else the whole directive.
 */
function wordLocation(directive: DirectiveComment, word: Word | undefined): SourceLocation {
  const { range } = directive.location;
  if (!word || range.start.line !== range.end.line) return directive.location;
  const textStart = range.end.column - directive.text.trimEnd().length;
  const offsetStart = range.end.offset - directive.text.trimEnd().length;
  if (textStart < range.start.column) return directive.location;
  const start = { line: range.start.line, column: textStart + word.start, offset: offsetStart + word.start };
  const end = { line: range.start.line, column: start.column + word.text.length, offset: start.offset + word.text.length };
  const wordRange: Range = { start, end };
  return { uri: directive.location.uri, range: wordRange };
}

/** An element by name, case-insensitive, trying the directive's subcircuit scope first. */
export function findElement(circuit: Circuit, name: string, scope: string): Element | undefined {
  const wanted = [scope + name, name].map((candidate) => candidate.toLowerCase());
  for (const candidate of wanted) {
    const element = circuit.elements.find((each) => each.name.toLowerCase() === candidate);
    if (element) return element;
  }
  return undefined;
}

function resolveRatingTarget(
  circuit: Circuit,
  name: string,
  scope: string,
): { target: RatingTarget; isDiode: boolean } | undefined {
  const element = findElement(circuit, name, scope);
  if (element && (element.type === 'D' || element.type === 'R')) {
    return { target: { kind: 'element', name: element.name }, isDiode: element.type === 'D' };
  }
  for (const key of [(scope + name).toLowerCase(), name.toLowerCase()]) {
    const model = circuit.models.get(key);
    if (model && model.type === 'D') return { target: { kind: 'model', key }, isDiode: true };
  }
  return undefined;
}
