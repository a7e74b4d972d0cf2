// Hover: on a number, its exact reading; on a `.model` or a model reference, its
// parameters with units; on a subcircuit instance, its ports and parameters; on a
// diode, what the analysis knows of it; on a rule id in a directive, the rule.
import {
  readMarkingCode,
  readSpiceNumber,
  type ElementStatement,
  type Field,
  type ModelStatement,
  type NumberField,
  type SubcktStatement,
} from '@pnlint/grammar';
import { MarkupKind, type Hover, type HoverParams } from 'vscode-languageserver';
import type { TextDocument } from 'vscode-languageserver-textdocument';
import type { DiodeReport } from '../checks/index.js';
import { KIND_NAMES, RATING_SYMBOLS, type RatingKey } from '../checks/vocabulary.js';
import { describeRule } from '../rule-ids.js';
import { formatPercent, formatQuantity } from '../units.js';
import type { FeatureContext } from './context.js';
import { describeModelParameter, deviceOfModelType } from './model-parameters.js';
import { lspRangeOf } from './positions.js';
import {
  fieldText,
  findTarget,
  instanceSubcircuit,
  modelName,
  NODE_COUNT,
  parameterName,
  positionalFields,
  resolveName,
  subcircuitName,
  type Definition,
  type Scope,
  type SyntaxIndex,
  type SyntaxTarget,
} from './syntax.js';

/** The unit of an element's value, by element letter (SPICE3 element syntax). */
const VALUE_UNITS: Readonly<Record<string, string>> = { R: 'Ω', C: 'F', L: 'H', V: 'V', I: 'A' };
/** Units of instance parameters written `key=value` on an element line. */
const INSTANCE_PARAMETER_UNITS: Readonly<Record<string, string>> = { temp: '°C', dtemp: '°C', w: 'm', l: 'm', ad: 'm²', as: 'm²', pd: 'm', ps: 'm' };

const ELEMENT_NAMES: Readonly<Record<string, string>> = {
  R: 'resistor', C: 'capacitor', L: 'inductor', K: 'inductor coupling', V: 'voltage source', I: 'current source',
  E: 'voltage-controlled voltage source', F: 'current-controlled current source', G: 'voltage-controlled current source',
  H: 'current-controlled voltage source', B: 'behavioural source', D: 'diode', Q: 'bipolar transistor', M: 'MOSFET',
  J: 'JFET', S: 'voltage-controlled switch', W: 'current-controlled switch', X: 'subcircuit instance', T: 'transmission line',
};

export function hover(context: FeatureContext, params: HoverParams): Hover | null {
  const document = context.documents.get(params.textDocument.uri);
  if (!document) return null;
  const line = document.getText({ start: { line: params.position.line, character: 0 }, end: { line: params.position.line + 1, character: 0 } });
  const directive = describeDirectiveWord(line, params.position.character);
  if (directive) return { contents: { kind: MarkupKind.Markdown, value: directive } };
  const syntax = context.syntax(document);
  const target = findTarget(syntax, params.position);
  if (!target) return null;
  const markdown = describeTarget(context, document, target, () => context.index(document));
  if (!markdown) return null;
  const span = target.identifier?.span ?? target.field?.span;
  return { contents: { kind: MarkupKind.Markdown, value: markdown }, ...(span ? { range: lspRangeOf(syntax.lines, span) } : {}) };
}

function describeTarget(context: FeatureContext, document: TextDocument, target: SyntaxTarget, index: () => SyntaxIndex): string | undefined {
  const { statement, field } = target;
  if (!field) return undefined;

  if (target.identifier) return describeParameter(index(), target.identifier.name, target.scope);
  if (field.kind === 'number' && !(statement.kind === 'element' && isNodePosition(statement, field))) {
    return describeNumber(field, unitOfNumber(target));
  }
  if (statement.kind === 'model' && field === statement.name) return describeModel(statement, undefined);
  if (statement.kind === 'subckt' && field === statement.name) return describeSubcircuit(statement);
  if (statement.kind === 'element') {
    if (field === statement.name) return describeElement(context, document, statement, target.scope, index());
    if (field.kind === 'word' || field.kind === 'number') {
      const found = index();
      if (statement.letter === 'X' && field === instanceSubcircuit(statement)) {
        const subckt = resolveName(found.subcircuits, field.text, target.scope, subcircuitName);
        if (subckt) return describeSubcircuit(subckt.node, subckt);
      }
      const model = resolveName(found.models, field.text, target.scope, modelName);
      if (model) return describeModel(model.node, model);
    }
  }
  if (target.assign && field === target.assign.key && (statement.kind === 'param' || statement.kind === 'subckt')) {
    return describeParameter(index(), field.text, statement.kind === 'subckt' ? [...target.scope, statement] : target.scope);
  }
  return undefined;
}

function isNodePosition(element: ElementStatement, field: Field): boolean {
  const position = positionalFields(element).indexOf(field);
  const nodes = element.letter === 'X' ? Number.POSITIVE_INFINITY : (NODE_COUNT[element.letter] ?? 0);
  return position >= 0 && position < nodes && !(element.letter === 'X' && field === instanceSubcircuit(element));
}

function unitOfNumber(target: SyntaxTarget): string {
  const { statement, field, assign } = target;
  if (statement.kind === 'model' && assign) return describeModelParameter(statement.type.text, assign.key.text)?.unit ?? '';
  if (statement.kind === 'dot' && statement.command === 'temp') return '°C';
  if (statement.kind !== 'element' || !field) return '';
  if (assign) return INSTANCE_PARAMETER_UNITS[assign.key.text.toLowerCase()] ?? '';
  const unit = VALUE_UNITS[statement.letter];
  if (!unit) return '';
  // The value follows the nodes; a source's `DC 5` or bare `5` alike.
  const position = positionalFields(statement).indexOf(field);
  return position >= (NODE_COUNT[statement.letter] ?? 2) ? unit : '';
}

/** `4k7 → 4 kΩ as SPICE reads it`, with what the engine ignores and what was likely meant. */
export function describeNumber(field: NumberField, unit: string): string | undefined {
  const reading = readSpiceNumber(field.text);
  if (!reading) return undefined;
  const lines = [`\`${field.text}\` → **${formatQuantity(reading.value, unit, 12)}** as SPICE reads it`];
  if (reading.scale) lines.push(`Scale factor \`${reading.scale}\` = ×${formatScale(reading.scale)}.`);
  if (reading.ignored) {
    lines.push(`\`${reading.ignored}\` after the number is ignored by SPICE engines.`);
    const marking = /\d/.test(reading.ignored) ? readMarkingCode(field.text, unit === 'F' ? 'C' : 'R') : undefined;
    if (marking !== undefined) lines.push(`Read as a marking code (IEC 60062) it would be ${formatQuantity(marking, unit, 12)}; write it that way if that is what is meant.`);
  }
  if (reading.scale === 'M') lines.push('`M` is milli in SPICE; mega is `Meg`.');
  return lines.join('\n\n');
}

function formatScale(scale: string): string {
  const value = readSpiceNumber(`1${scale}`)?.value ?? 1;
  return value === 25.4e-6 ? '25.4e-6 (a thousandth of an inch)' : value.toExponential().replace('e+', 'e');
}

function whereDefined(definition: Definition<unknown> | undefined): string {
  if (!definition) return '';
  const file = definition.uri.split('/').pop() ?? definition.uri;
  return `\n\nDefined at ${file}:${definition.nameRange.start.line + 1}.`;
}

function describeModel(model: ModelStatement, definition: Definition<ModelStatement> | undefined): string {
  const device = deviceOfModelType(model.type.text);
  const header = `**.model ${model.name.text}** — ${device ?? `type ${model.type.text.toUpperCase()}`}`;
  if (model.params.length === 0) return `${header}\n\nNo parameters given: every parameter takes its SPICE default.${whereDefined(definition)}`;
  const rows = model.params.map((param) => {
    const described = describeModelParameter(model.type.text, param.key.text);
    const value = param.value.kind === 'number' ? formatQuantity(param.value.value, described?.unit ?? '', 6) : fieldText(param.value);
    return `| ${param.key.text.toUpperCase()} | \`${fieldText(param.value)}\` | ${value} | ${described?.meaning ?? 'not a parameter of this model type'} |`;
  });
  return [header, '', '| parameter | written | value | meaning |', '| --- | --- | --- | --- |', ...rows].join('\n') + whereDefined(definition);
}

function describeSubcircuit(subckt: SubcktStatement, definition?: Definition<SubcktStatement>): string {
  const ports = subckt.ports.map((port) => `\`${port.text}\``).join(' ');
  const params = subckt.params.map((param) => `\`${param.key.text}=${fieldText(param.value)}\``).join(', ');
  const elements = subckt.body.filter((s) => s.kind === 'element').length;
  return (
    `**.subckt ${subckt.name.text}** — ports ${ports || '(none)'}` +
    (params ? `\n\nParameters (defaults): ${params}` : '') +
    `\n\n${elements} element line${elements === 1 ? '' : 's'}.` +
    whereDefined(definition)
  );
}

function describeParameter(index: SyntaxIndex, name: string, scope: Scope): string | undefined {
  const definition = resolveName(index.parameters, name, scope, parameterName);
  if (!definition) return undefined;
  const where = definition.scope.length > 0 ? ` (parameter of subcircuit ${definition.scope[definition.scope.length - 1]!.name.text})` : '';
  return `**${definition.node.key.text}** = \`${fieldText(definition.node.value)}\`${where}${whereDefined(definition)}`;
}

function describeElement(context: FeatureContext, document: TextDocument, element: ElementStatement, scope: Scope, index: SyntaxIndex): string {
  const kind = ELEMENT_NAMES[element.letter] ?? `element of type ${element.letter}`;
  const positional = positionalFields(element);
  const lines: string[] = [];
  if (element.letter === 'X') {
    const subcktField = instanceSubcircuit(element);
    const subckt = subcktField ? resolveName(index.subcircuits, fieldText(subcktField), scope, subcircuitName) : undefined;
    const nodes = positional.slice(0, subcktField ? positional.indexOf(subcktField) : positional.length);
    lines.push(`**${element.name.text}** — instance of subcircuit \`${subcktField ? fieldText(subcktField) : '?'}\``);
    if (subckt) {
      const pairs = subckt.node.ports.map((port, i) => `| \`${port.text}\` | \`${nodes[i] ? fieldText(nodes[i]) : '(missing)'}\` |`);
      lines.push('', '| port | connected to |', '| --- | --- |', ...pairs);
      const overrides = new Map(element.fields.filter((f) => f.kind === 'assign').map((f) => [f.key.text.toLowerCase(), fieldText(f.value)]));
      const params = subckt.node.params.map((param) => {
        const given = overrides.get(param.key.text.toLowerCase());
        return `\`${param.key.text}\` = \`${given ?? fieldText(param.value)}\`${given === undefined ? ' (default)' : ''}`;
      });
      if (params.length > 0) lines.push('', `Parameters: ${params.join(', ')}`);
      lines.push(whereDefined(subckt).trim());
    } else lines.push('', 'Its subcircuit is not defined in this file or its includes.');
    return lines.join('\n');
  }
  const nodeCount = NODE_COUNT[element.letter] ?? 2;
  const nodes = positional.slice(0, nodeCount).map((node) => `\`${fieldText(node)}\``);
  if (element.letter === 'D') {
    lines.push(`**${element.name.text}** — diode, anode ${nodes[0] ?? '?'} → cathode ${nodes[1] ?? '?'}`);
  } else {
    lines.push(`**${element.name.text}** — ${kind}${nodes.length > 0 ? `, nodes ${nodes.join(' ')}` : ''}`);
  }
  if (element.letter === 'D') {
    const reports = context.diodeReportsAt(document, context.syntax(document).lines.lineOf(element.span.start));
    for (const report of reports) lines.push('', describeDiodeReport(report, reports.length > 1));
    if (reports.length > 0) {
      const caution = context.current(document)?.findings.find((finding) => finding.rule === HAZARD_RULE);
      if (caution) lines.push('', `> ${caution.message}`);
      return lines.join('\n');
    }
    if (!context.current(document)) lines.push('', '_Being checked: the operating point shows here when the check is done._');
  }
  const modelField = positional[nodeCount];
  const model = modelField && modelField.kind === 'word' ? resolveName(index.models, modelField.text, scope, modelName) : undefined;
  if (model) lines.push('', describeModel(model.node, model));
  return lines.join('\n');
}

/** The finding that says a circuit touches hazardous voltages (a design aid, not a safety approval). */
const HAZARD_RULE = 'hazardous-voltage';

/** A diode's kind and why, its ratings and their sources, and its operating point and margins at each corner. */
function describeDiodeReport(report: DiodeReport, named: boolean): string {
  const lines = [
    `${named ? `**${report.element}**: ` : ''}**${KIND_NAMES[report.kind]}** — ${report.kindReason}. A \`*pnlint: rating ${report.element.split('.').pop()} kind=…\` directive overrides it.`,
  ];
  if (report.ratings.length > 0) lines.push('', `Ratings: ${report.ratings.map((rating) => rating.text).join(' · ')}`);
  if (report.unchecked) {
    lines.push('', `Not checked: ${report.unchecked}.`);
    return lines.join('\n');
  }
  lines.push('', '| corner | voltage | current | power | region | use of rating |', '| --- | --- | --- | --- | --- | --- |');
  for (const corner of report.corners) {
    const where = `${corner.description}${corner.quasiStatic ? ' (quasi-static)' : ''}`;
    if (!corner.point) {
      lines.push(`| ${where} | not solved | | | | |`);
      continue;
    }
    const { voltage, current, power, region } = corner.point;
    const margins = corner.margins.map((margin) => `${RATING_SYMBOLS[margin.key].symbol} ${formatPercent(margin.fraction)}`).join(' · ');
    lines.push(`| ${where} | ${formatQuantity(voltage, 'V')} | ${formatQuantity(current, 'A')} | ${formatQuantity(power, 'W')} | ${region} | ${margins || '—'} |`);
  }
  return lines.join('\n');
}

/** In a `*pnlint:` directive (a comment line or an inline comment), a rule id or rating key under the cursor. */
function describeDirectiveWord(line: string, character: number): string | undefined {
  const marker = /(^\s*\*|;|\s\$)\s*pnlint:/i.exec(line);
  if (!marker || character < marker.index + marker[0].length) return undefined;
  const before = /[A-Za-z0-9-]*$/.exec(line.slice(0, character))![0];
  const after = /^[A-Za-z0-9-]*/.exec(line.slice(character))![0];
  const word = (before + after).toLowerCase();
  if (!word) return undefined;
  const rule = describeRule(word);
  if (rule) return `**${rule.id}** — ${rule.summary} (default severity: ${rule.defaultSeverity})`;
  if (word in RATING_SYMBOLS) {
    const rating = RATING_SYMBOLS[word as RatingKey];
    return `**${word}** — ${rating.symbol}, ${rating.meaning} (${rating.unit})`;
  }
  return undefined;
}
