// Elaboration: from the syntax trees of a netlist and the files it includes to
// one flat circuit. Includes and `.lib` sections are read through the injected
// FileReader, `.if` blocks are decided, parameters evaluated, subcircuits
// flattened with hierarchical names (`X2.D1`, node `X2.a`), and every element
// keeps the line it came from. Bad input never throws: it becomes a diagnostic.
import {
  isAmbiguousNumber,
  LineIndex,
  parse,
  readMarkingCode,
  readSpiceNumber,
  type ElementStatement,
  type IncludeStatement,
  type LibReferenceStatement,
  type ParseResult,
  type Range,
  type Span,
  type Statement,
  type SubcktStatement,
} from '@pnlint/grammar';
import { GROUND, type Circuit, type DirectiveComment, type Element, type FileReader, type Model, type SourceLocation } from './circuit.js';
import { DiagnosticSink, FILE_START } from './diagnostics.js';
import { readElement, type ElementContext, type NodeField } from './elements.js';
import { formatSpiceNumber, unitOfElement } from './format.js';
import { formatQuantity } from '../units.js';
import { readModel } from './models.js';
import { ParameterEvaluation, ParameterScope } from './parameters.js';
import { isWithin } from './paths.js';
import { TIMES_WITHOUT_TRANSIENT, type TransientTimes } from './waveforms.js';

export interface ElaborateOptions {
  /** Untrusted workspace: files outside `workspaceRoot` are not read. */
  restricted?: boolean;
  workspaceRoot?: string;
}

/** A value's exact reading is shown with all the digits it was written with, not the usual three. */
const EXACT_READING_DIGITS = 12;

/** SPICE's default circuit temperature, 27 °C (SPICE3 user's manual, Quarles 1989). */
export const DEFAULT_TEMPERATURE = 27;
/** Subcircuits nested deeper than this are reported rather than expanded (no real design comes close). */
export const MAXIMUM_SUBCIRCUIT_DEPTH = 100;
/** Includes nested deeper than this are reported rather than read. */
export const MAXIMUM_INCLUDE_DEPTH = 64;
/** Elaboration stops at this many elements, so that a netlist whose subcircuits multiply out cannot exhaust memory. */
export const MAXIMUM_ELEMENTS = 2_000_000;

/** The range of a context not yet at any line (replaced before it is read). */
const NO_RANGE: Range = { start: { line: 0, column: 0, offset: 0 }, end: { line: 0, column: 0, offset: 0 } };

/** Appends `items` to `list` one by one: a spread push overflows the call stack on a file of some hundred thousand lines. */
function appendAll<T>(list: T[], items: readonly T[]): void {
  for (const item of items) list.push(item);
}

/** Digits with at most one point and no letters: a SPICE engine reads all of it, so it cannot be ambiguous. */
const PLAIN_DECIMAL = /^[+-]?\d*\.?\d*$/;

/** Ground's other name (any case). */
const GROUND_ALIAS = 'gnd';
const DIRECTIVE = /^\s*pnlint:/i;

interface Located {
  statement: Statement;
  uri: string;
}

interface SubcircuitDefinition {
  statement: SubcktStatement;
  uri: string;
  /** Where it was defined: its body sees that scope's parameters, models and subcircuits. */
  frame: Frame;
}

/** One scope: the top level, or one subcircuit instance. */
interface Frame {
  /** `X2.` inside instance X2, empty at top level. */
  prefix: string;
  /** The scope the definition sits in (lexical parent). */
  parent: Frame | undefined;
  /** Port name (lower-cased) → the caller's circuit node. */
  ports: Map<string, string>;
  params: ParameterScope;
  subcircuits: Map<string, SubcircuitDefinition>;
  models: Map<string, Model>;
  instances: SourceLocation[];
  /** The subcircuits being expanded, outermost first, with the instance names: recursion is found here. */
  active: { definition: SubcktStatement; instance: string }[];
  /** Element names (lower-cased) in this scope → the first line of that name. */
  elementNames: Map<string, Located>;
  /** Inside an instance: local node names (lower-cased) → circuit node, made on the first one. */
  localNodes?: Map<string, string>;
  /** What the element readers see of this scope; made on its first element line (see `elementContext`). */
  elementContext?: ElementContext;
}

/**
 * Elaborates the netlist `text` (the top-level file at `uri`). Never throws:
 * every problem is in `circuit.diagnostics`.
 */
export function elaborate(uri: string, text: string, reader: FileReader, options: ElaborateOptions = {}): Circuit {
  return new Elaborator(uri, reader, options).run(text);
}

class Elaborator {
  private readonly sink = new DiagnosticSink((uri) => this.parsed.get(uri)?.lines);
  private readonly files = new Map<string, string>();
  private readonly parsed = new Map<string, ParseResult | undefined>();
  private readonly includeStack: string[] = [];
  private readonly elements: Element[] = [];
  private readonly directives: DirectiveComment[] = [];
  private readonly models = new Map<string, Model>();
  private readonly nodeNames = new Map<string, string>([[GROUND, GROUND]]);
  private readonly nodes: string[] = [GROUND];
  private readonly globals = new Set<string>();
  private temperature: number | undefined;
  private readonly options: Record<string, number> = {};
  private times: TransientTimes = TIMES_WITHOUT_TRANSIENT;
  private budgetReported = false;
  /** Indices in `elements` of the F, H, W and K elements, which name other elements (see resolveReferences). */
  private readonly referencing: number[] = [];
  private readonly evaluation: ParameterEvaluation;

  constructor(
    private readonly uri: string,
    private readonly reader: FileReader,
    private readonly settings: ElaborateOptions,
  ) {
    this.evaluation = new ParameterEvaluation(this.sink, (fileUri, numberText, span, letter, inExpression) =>
      this.checkAmbiguous(fileUri, numberText, span, letter, inExpression),
    );
  }

  run(text: string): Circuit {
    let title: string | undefined;
    const top = this.topFrame();
    try {
      this.files.set(this.uri, text);
      const syntax = this.parseText(this.uri, text, false);
      const titleStatement = syntax.statements.find((s) => s.kind === 'title');
      title = titleStatement?.kind === 'title' ? titleStatement.text : undefined;
      this.includeStack.push(this.uri);
      const statements = this.prepare(this.expand(syntax.statements, this.uri, true), top);
      this.collectCircuitSettings(statements, top);
      this.register(statements, top);
      this.walk(statements, top);
      this.resolveReferences();
    } catch (error) {
      // A bug of ours must not take the editor down: say so where the user can see it.
      this.sink.error(this.uri, FILE_START, `internal error while reading the netlist: ${error instanceof Error ? error.message : String(error)}`);
    }
    return {
      uri: this.uri,
      title,
      elements: this.elements,
      models: this.models,
      nodes: this.nodes,
      temperature: this.temperature ?? DEFAULT_TEMPERATURE,
      options: this.options,
      directives: this.directives,
      parameters: top.params.values(),
      files: this.files,
      syntax: new Map([...this.parsed].filter((entry): entry is [string, ParseResult] => entry[1] !== undefined)),
      diagnostics: this.sink.diagnostics,
    };
  }

  private topFrame(): Frame {
    return {
      prefix: '',
      parent: undefined,
      ports: new Map(),
      params: new ParameterScope(undefined, this.evaluation),
      subcircuits: new Map(),
      models: new Map(),
      instances: [],
      active: [],
      elementNames: new Map(),
    };
  }

  // ------------------------------------------------------------ files

  private parseText(uri: string, text: string, isInclude: boolean): ParseResult {
    let result: ParseResult;
    try {
      result = parse(text, { isInclude });
    } catch (error) {
      result = { statements: [], diagnostics: [], lines: new LineIndex(text) };
      this.sink.report('error', 'syntax', uri, FILE_START, `the parser failed on this file: ${error instanceof Error ? error.message : String(error)}`);
    }
    this.parsed.set(uri, result);
    for (const d of result.diagnostics) this.sink.add({ severity: d.severity, code: d.code, message: d.message, location: { uri, range: d.range } });
    return result;
  }

  /** Reads and parses an included file once, however often it is included. */
  private load(uri: string): ParseResult | undefined {
    if (this.parsed.has(uri)) return this.parsed.get(uri);
    let text: string | undefined;
    try {
      text = this.reader.read(uri);
    } catch {
      text = undefined;
    }
    if (text === undefined) {
      this.parsed.set(uri, undefined);
      return undefined;
    }
    this.files.set(uri, text);
    return this.parseText(uri, text, true);
  }

  /** Resolves an include's path, or reports why it cannot be read. */
  private target(statement: IncludeStatement | LibReferenceStatement, fromUri: string): string | undefined {
    let target: string;
    try {
      target = this.reader.resolve(fromUri, statement.path);
    } catch {
      this.sink.error(fromUri, statement.pathSpan, `cannot resolve the path ${statement.path}`);
      return undefined;
    }
    if (this.settings.restricted && !(this.settings.workspaceRoot && isWithin(target, this.settings.workspaceRoot))) {
      this.sink.error(
        fromUri,
        statement.pathSpan,
        `${statement.path} is not read: it lies outside the workspace, and files outside the workspace are not read in an untrusted (restricted) workspace`,
      );
      return undefined;
    }
    if (this.includeStack.length >= MAXIMUM_INCLUDE_DEPTH) {
      this.sink.error(fromUri, statement.span, `includes are nested more than ${MAXIMUM_INCLUDE_DEPTH} deep; ${statement.path} is not read`);
      return undefined;
    }
    return target;
  }

  private cycle(key: string, statement: Statement, fromUri: string, what: string): boolean {
    const index = this.includeStack.indexOf(key);
    if (index < 0) return false;
    const chain = [...this.includeStack.slice(index), key].map((k) => k.replace(/^.*[\\/]/, '')).join(' → ');
    this.sink.error(fromUri, statement.span, `include cycle: ${what} is already being read (${chain})`);
    return true;
  }

  /** Replaces includes and `.lib` references by their statements; `.if` blocks stay for `prepare` to decide. */
  private expand(statements: Statement[], uri: string, isTop = false): Located[] {
    const out: Located[] = [];
    for (const statement of statements) {
      switch (statement.kind) {
        case 'include': {
          const target = this.target(statement, uri);
          if (target === undefined || this.cycle(target, statement, uri, statement.path)) break;
          const syntax = this.load(target);
          if (!syntax) {
            this.sink.error(uri, statement.span, `cannot read ${statement.path} (looked for ${target})`);
            break;
          }
          this.includeStack.push(target);
          appendAll(out, this.expand(syntax.statements, target));
          this.includeStack.pop();
          break;
        }
        case 'libReference': {
          const target = this.target(statement, uri);
          const section = statement.section.text;
          const key = `${target}#${section.toLowerCase()}`;
          if (target === undefined || this.cycle(key, statement, uri, `section ${section} of ${statement.path}`)) break;
          const syntax = this.load(target);
          if (!syntax) {
            this.sink.error(uri, statement.span, `cannot read ${statement.path} (looked for ${target})`);
            break;
          }
          const sections = syntax.statements.filter((s) => s.kind === 'libSection');
          const found = sections.find((s) => s.name.text.toLowerCase() === section.toLowerCase());
          if (!found) {
            const names = sections.map((s) => s.name.text);
            this.sink.error(
              uri,
              statement.section.span,
              `${statement.path} has no section ${section}${names.length ? ` (it has ${names.join(', ')})` : ''}`,
            );
            break;
          }
          this.includeStack.push(key);
          appendAll(out, this.expand(found.body, target));
          this.includeStack.pop();
          break;
        }
        case 'libSection':
          // A section is read only when a `.lib file section` line asks for it.
          break;
        case 'end':
          if (isTop) return out; // engines read nothing after `.end`
          break;
        default:
          out.push({ statement, uri });
      }
    }
    return out;
  }

  // ------------------------------------------------- parameters and .if

  /** Defines the scope's `.param`s and `.func`s, decides its `.if` blocks, and returns the statements that remain. */
  private prepare(located: Located[], frame: Frame): Located[] {
    const defined: string[] = [];
    let hasIf = false;
    for (const { statement, uri } of located) {
      if (statement.kind === 'if') hasIf = true;
      else if (statement.kind === 'param') {
        for (const assign of statement.assigns) {
          frame.params.define(assign.key.text, assign.value, uri, assign.span);
          defined.push(assign.key.text.toLowerCase());
        }
      } else if (statement.kind === 'func' && statement.body?.expr) {
        frame.params.defineFunction({
          name: statement.name.text,
          parameters: statement.args.map((a) => a.text.toLowerCase()),
          body: statement.body.expr,
          uri,
          scope: frame.params,
        });
      }
    }
    let out = located;
    if (hasIf) {
      out = [];
      for (const item of located) {
        if (item.statement.kind !== 'if') {
          out.push(item);
          continue;
        }
        const taken = this.takenBranch(item.statement, item.uri, frame);
        if (taken) appendAll(out, this.prepare(this.expand(taken, item.uri), frame));
      }
    }
    // Evaluate every parameter now, in the order written, so that each problem is reported where it was written.
    for (const name of defined) frame.params.parameter(name);
    return out;
  }

  private takenBranch(statement: Extract<Statement, { kind: 'if' }>, uri: string, frame: Frame): Statement[] | undefined {
    for (const branch of statement.branches) {
      if (!branch.condition) return branch.body;
      if (!branch.condition.expr) return undefined; // does not parse: its syntax diagnostic says so
      const value = frame.params.evaluateField(branch.condition, uri);
      if (value === undefined) return undefined;
      if (value !== 0) return branch.body;
    }
    return undefined;
  }

  // ------------------------------------------ models, subcircuits, options

  private collectCircuitSettings(located: Located[], frame: Frame): void {
    for (const { statement, uri } of located) {
      if (statement.kind === 'global') {
        for (const node of statement.nodes) this.globals.add(node.text.toLowerCase());
      } else if (statement.kind === 'dot') {
        if (statement.command === 'temp' && this.temperature === undefined) {
          const first = statement.fields[0];
          if (first) this.temperature = frame.params.evaluateField(first, uri);
          else this.sink.error(uri, statement.span, `.temp needs a temperature in °C`);
        } else if (statement.command === 'options') {
          for (const field of statement.fields) {
            if (field.kind !== 'assign') continue; // flags such as `noacct` carry no number
            const value = frame.params.evaluateField(field.value, uri);
            if (value !== undefined) this.options[field.key.text.toLowerCase()] = value;
          }
        } else if (statement.command === 'tran') {
          const [step, stop] = statement.fields.filter((f) => f.kind !== 'assign');
          const stepValue = step ? frame.params.evaluateField(step, uri) : undefined;
          const stopValue = stop ? frame.params.evaluateField(stop, uri) : undefined;
          if (stepValue !== undefined && stopValue !== undefined) this.times = { step: stepValue, stop: stopValue };
        }
      }
    }
  }

  private register(located: Located[], frame: Frame): void {
    for (const { statement, uri } of located) {
      if (statement.kind === 'subckt') {
        const key = statement.name.text.toLowerCase();
        const first = frame.subcircuits.get(key);
        if (first) {
          this.sink.warning(uri, statement.name.span, `duplicate subcircuit ${statement.name.text}: SPICE engines keep the first definition`, {
            related: [{ location: this.sink.location(first.uri, first.statement.name.span), message: 'the first definition' }],
          });
          continue;
        }
        frame.subcircuits.set(key, { statement, uri, frame });
      } else if (statement.kind === 'model') {
        const key = statement.name.text.toLowerCase();
        const first = frame.models.get(key);
        if (first) {
          this.sink.warning(
            uri,
            statement.name.span,
            `duplicate model ${statement.name.text}: SPICE engines keep the first definition (line ${first.location.range.start.line + 1}), so this one is ignored`,
            { related: [{ location: first.location, message: 'the definition in use' }] },
          );
          continue;
        }
        const model = readModel(statement, uri, frame.params, this.sink);
        frame.models.set(key, model);
        this.models.set(frame.prefix.toLowerCase() + key, model);
      } else if (statement.kind === 'global' && frame.prefix !== '') {
        for (const node of statement.nodes) this.globals.add(node.text.toLowerCase());
      }
    }
  }

  private findModel(frame: Frame, name: string): Model | undefined {
    const key = name.toLowerCase();
    for (let f: Frame | undefined = frame; f; f = f.parent) {
      const model = f.models.get(key);
      if (model) return model;
    }
    return undefined;
  }

  private findSubcircuit(frame: Frame, name: string): SubcircuitDefinition | undefined {
    const key = name.toLowerCase();
    for (let f: Frame | undefined = frame; f; f = f.parent) {
      const definition = f.subcircuits.get(key);
      if (definition) return definition;
    }
    return undefined;
  }

  // ---------------------------------------------------------- nodes

  /** `key` is `name` lower-cased, when the caller has it already. */
  private canonicalNode(name: string, key = name.toLowerCase()): string {
    const existing = this.nodeNames.get(key);
    if (existing !== undefined) return existing;
    this.nodeNames.set(key, name);
    this.nodes.push(name);
    return name;
  }

  private node(frame: Frame, name: string): string {
    const key = name.toLowerCase();
    if (key === GROUND || key === GROUND_ALIAS) return GROUND;
    if (this.globals.has(key)) return this.canonicalNode(name, key);
    const port = frame.ports.get(key);
    if (port !== undefined) return port;
    if (frame.prefix === '') return this.canonicalNode(name, key);
    // Inside an instance, remember each local node: `X12.a` is built and looked up once, not once per line.
    // (Checked after the globals, which a nested subcircuit's `.global` may still extend.)
    frame.localNodes ??= new Map();
    const known = frame.localNodes.get(key);
    if (known !== undefined) return known;
    const node = this.canonicalNode(frame.prefix + name);
    frame.localNodes.set(key, node);
    return node;
  }

  // ------------------------------------------------------- elements

  private walk(located: Located[], frame: Frame): void {
    let pending: DirectiveComment[] = [];
    for (const item of located) {
      const { statement, uri } = item;
      if (statement.kind === 'comment') {
        const match = DIRECTIVE.exec(statement.text);
        if (match) {
          const directive: DirectiveComment = {
            text: statement.text.slice(match[0].length).trim(),
            location: this.sink.location(uri, statement.span),
            inline: false,
            nextElement: undefined,
            scope: frame.prefix,
          };
          this.directives.push(directive);
          pending.push(directive);
        }
        continue;
      }
      const name = statement.kind === 'element' ? frame.prefix + statement.name.text : undefined;
      if (name !== undefined && pending.length > 0) {
        for (const directive of pending) directive.nextElement = name;
        pending = [];
      }
      const inline = statement.comment;
      if (inline) {
        const match = DIRECTIVE.exec(inline.text);
        if (match) {
          this.directives.push({
            text: inline.text.slice(match[0].length).trim(),
            location: this.sink.location(uri, inline.span),
            inline: true,
            nextElement: name,
            scope: frame.prefix,
          });
        }
      }
      if (statement.kind === 'element') this.element(statement, item, frame);
    }
  }

  /** `line` is the element line with its file: kept as the first of its name, to point at if the name comes again. */
  private element(statement: ElementStatement, line: Located, frame: Frame): void {
    const uri = line.uri;
    if (this.elements.length >= MAXIMUM_ELEMENTS) {
      if (!this.budgetReported) {
        this.budgetReported = true;
        this.sink.error(uri, statement.span, `the circuit has more than ${MAXIMUM_ELEMENTS} elements once its subcircuits are expanded; the rest is not read`);
      }
      return;
    }
    const key = statement.name.text.toLowerCase();
    const first = frame.elementNames.get(key);
    if (first) {
      const firstName = (first.statement as ElementStatement).name;
      this.sink.error(
        uri,
        statement.name.span,
        `duplicate element name ${statement.name.text}${frame.prefix ? ` in subcircuit instance ${frame.prefix.slice(0, -1)}` : ''}: SPICE engines reject it; this line is not read`,
        { related: [{ location: this.sink.location(first.uri, firstName.span), message: 'the first element of that name' }] },
      );
      return;
    }
    frame.elementNames.set(key, line);
    if (statement.letter === 'X') {
      this.instantiate(statement, uri, frame);
      return;
    }
    const context = this.elementContext(frame);
    context.name = frame.prefix + statement.name.text;
    context.location = this.sink.location(uri, statement.span);
    context.uri = uri;
    // A line with a syntax error already has its one diagnostic: read what can be read, quietly.
    context.sink = statement.incomplete ? new DiagnosticSink() : this.sink;
    const element = readElement(statement, context);
    if (element === undefined) return;
    this.elements.push(element);
    if (element.type === 'F' || element.type === 'H' || element.type === 'W' || element.type === 'K') this.referencing.push(this.elements.length - 1);
  }

  /**
   * One context per scope, its line fields (name, location, uri, sink) set
   * before each element line is read: a fresh context with its closures for
   * every line was a measurable share of elaborating a large netlist. Readers
   * use it only while they read their line.
   */
  private elementContext(frame: Frame): ElementContext {
    if (frame.elementContext) return frame.elementContext;
    const context: ElementContext = {
      name: '',
      prefix: frame.prefix,
      location: { uri: this.uri, range: NO_RANGE },
      instances: frame.instances,
      uri: this.uri,
      sink: this.sink,
      node: (field: NodeField) => this.node(frame, field.text),
      value: (field, letter) => frame.params.evaluateField(field, context.uri, letter),
      model: (name) => this.findModel(frame, name),
      options: this.options,
      // Circuit settings are all read before the first element line.
      temperature: this.temperature ?? DEFAULT_TEMPERATURE,
      times: this.times,
    };
    frame.elementContext = context;
    return context;
  }

  private instantiate(statement: ElementStatement, uri: string, frame: Frame): void {
    const positional: NodeField[] = [];
    const overrides: Extract<ElementStatement['fields'][number], { kind: 'assign' }>[] = [];
    for (const field of statement.fields) {
      if (field.kind === 'assign') overrides.push(field);
      else if (field.kind === 'word' && /^params:?$/i.test(field.text)) continue;
      else if (field.kind === 'word' || field.kind === 'number') positional.push(field);
      else this.sink.warning(uri, field.span, `${field.kind === 'expression' ? field.text : 'this list'} is not understood on a subcircuit instance line and is ignored`);
    }
    const subcircuitName = positional.pop();
    if (!subcircuitName) {
      this.sink.error(uri, statement.span, `${statement.name.text} names no subcircuit (X1 node… SUBCIRCUIT [params])`);
      return;
    }
    const definition = this.findSubcircuit(frame, subcircuitName.text);
    if (!definition) {
      const instanceName = frame.prefix + statement.name.text;
      this.sink.report('warning', 'unknown-model', uri, subcircuitName.span, `subcircuit ${subcircuitName.text} not found: ${instanceName} is not checked`, {
        element: instanceName,
      });
      // Kept as an element the solver leaves open, so that the checks know which diodes it could move.
      this.elements.push({
        type: 'unmodeled',
        letter: 'X',
        name: instanceName,
        nodes: positional.map((field) => this.node(frame, field.text)),
        location: this.sink.location(uri, statement.span),
        instances: frame.instances,
        reason: `subcircuit ${subcircuitName.text} not found`,
        missingDefinition: subcircuitName.text,
      });
      return;
    }
    const ports = definition.statement.ports;
    if (positional.length !== ports.length) {
      this.sink.error(
        uri,
        statement.span,
        `${statement.name.text} connects ${positional.length} node${positional.length === 1 ? '' : 's'}, but subcircuit ${definition.statement.name.text} has ${ports.length} port${ports.length === 1 ? '' : 's'} (${ports.map((p) => p.text).join(' ') || 'none'})`,
        { related: [{ location: this.sink.location(definition.uri, definition.statement.name.span), message: 'the subcircuit' }] },
      );
      return;
    }
    const instanceName = frame.prefix + statement.name.text;
    const recursion = frame.active.findIndex((a) => a.definition === definition.statement);
    if (recursion >= 0) {
      const chain = [...frame.active.slice(recursion).map((a) => a.instance), instanceName].join(' → ');
      this.sink.error(uri, statement.span, `subcircuit ${definition.statement.name.text} contains itself (${chain}); it is not expanded`);
      return;
    }
    if (frame.active.length >= MAXIMUM_SUBCIRCUIT_DEPTH) {
      this.sink.error(uri, statement.span, `subcircuits are nested more than ${MAXIMUM_SUBCIRCUIT_DEPTH} deep; ${instanceName} is not expanded`);
      return;
    }
    // Instance values are evaluated where the instance is written; the defaults inside the subcircuit.
    const scope = definition.frame.params.child();
    const declared = new Set(definition.statement.params.map((p) => p.key.text.toLowerCase()));
    for (const override of overrides) {
      const key = override.key.text;
      if (!declared.has(key.toLowerCase())) {
        this.sink.warning(
          uri,
          override.key.span,
          `subcircuit ${definition.statement.name.text} declares no parameter ${key}; it is ignored`,
        );
        continue;
      }
      scope.setValue(key, frame.params.evaluateField(override.value, uri), uri, override.span, true);
    }
    for (const parameter of definition.statement.params) scope.define(parameter.key.text, parameter.value, definition.uri, parameter.span);
    const portMap = new Map<string, string>();
    ports.forEach((port, index) => portMap.set(port.text.toLowerCase(), this.node(frame, positional[index]!.text)));
    const inner: Frame = {
      prefix: `${instanceName}.`,
      parent: definition.frame,
      ports: portMap,
      params: scope,
      subcircuits: new Map(),
      models: new Map(),
      instances: [...frame.instances, this.sink.location(uri, statement.span)],
      active: [...frame.active, { definition: definition.statement, instance: instanceName }],
      elementNames: new Map(),
    };
    const body = this.prepare(this.expand(definition.statement.body, definition.uri), inner);
    this.register(body, inner);
    this.walk(body, inner);
  }

  // ------------------------------------------- references between elements

  /**
   * F, H and W name a controlling voltage source, K two inductors: check that
   * they exist and use the names as first written. One that does not exist
   * leaves its element unmodeled.
   */
  private resolveReferences(): void {
    if (this.referencing.length === 0) return;
    const byName = new Map<string, Element>();
    for (const element of this.elements) {
      const key = element.name.toLowerCase();
      if (!byName.has(key)) byName.set(key, element);
    }
    const find = (name: string, type: string, prefix: string): Element | undefined => {
      const local = byName.get(name.toLowerCase());
      if (local?.type === type) return local;
      // Not in the subcircuit: a top-level element of that name.
      const global = prefix ? byName.get(name.slice(prefix.length).toLowerCase()) : undefined;
      return global?.type === type ? global : undefined;
    };
    const prefixOf = (element: Element) => element.name.slice(0, element.name.length - (element.name.split('.').pop()?.length ?? 0));
    for (const index of this.referencing) {
      const element = this.elements[index]!;
      if (element.type === 'F' || element.type === 'H' || element.type === 'W') {
        const source = find(element.controlSource, 'V', prefixOf(element));
        if (source) {
          element.controlSource = source.name;
          continue;
        }
        const written = element.controlSource.slice(prefixOf(element).length);
        this.sink.errorAt(element.location, `${element.name} is controlled by the current of ${written}, which is not a voltage source in this circuit`);
        this.elements[index] = {
          type: 'unmodeled',
          letter: element.type,
          name: element.name,
          nodes: element.nodes,
          location: element.location,
          instances: element.instances,
          reason: `its controlling source ${written} does not exist`,
        };
      } else if (element.type === 'K') {
        const inductors = element.inductors.map((name) => find(name, 'L', prefixOf(element)));
        const missing = element.inductors.filter((_, i) => !inductors[i]).map((n) => n.slice(prefixOf(element).length));
        if (missing.length === 0) {
          element.inductors = inductors.map((l) => l!.name);
          continue;
        }
        this.sink.errorAt(element.location, `${element.name} couples ${missing.join(' and ')}, which ${missing.length === 1 ? 'is not an inductor' : 'are not inductors'} in this circuit`);
      }
    }
  }

  // ---------------------------------------------------- ambiguous values

  /**
   * `4k7` on an element line reads as 4 kΩ in SPICE engines: say so, with the
   * reading the writer may have meant. Inside `{…}` or a `.param` value ngspice 39
   * does not truncate but stops ("Misplaced operator", checked by running it).
   */
  private checkAmbiguous(uri: string, text: string, span: Span, letter: string, inExpression: boolean): void {
    // Most values are plain decimals (`10`, `0.5`), which SPICE engines read whole: nothing to look at.
    if (PLAIN_DECIMAL.test(text)) return;
    const reading = readSpiceNumber(text);
    if (!reading || !isAmbiguousNumber(reading)) return;
    const unit = unitOfElement(letter);
    const intended = this.intendedReading(text, letter);
    // Each reading is formatted once: a netlist full of such values spends its time here.
    const engineReading = formatQuantity(reading.value, unit, EXACT_READING_DIGITS);
    let message = inExpression
      ? `${text} is not a number in an expression or .param value: ngspice stops with "Misplaced operator" (pnlint reads ${engineReading}, ignoring the ${reading.ignored})`
      : `${text} is read as ${engineReading} by SPICE engines (the ${reading.ignored} is ignored)`;
    const suggestions: { title: string; edits: { location: SourceLocation; newText: string }[] }[] = [];
    const location = this.sink.location(uri, span);
    if (intended) {
      const intendedReading = formatQuantity(intended.value, unit, EXACT_READING_DIGITS);
      message += `; ${intended.convention} it means ${intendedReading}`;
      const exact = formatSpiceNumber(intended.value);
      suggestions.push({ title: `Write ${exact} (${intendedReading})`, edits: [{ location, newText: exact }] });
    }
    const engine = formatSpiceNumber(reading.value);
    suggestions.push({ title: `Write ${engine} (${engineReading}, as SPICE engines read it)`, edits: [{ location, newText: engine }] });
    this.sink.report(inExpression ? 'error' : 'warning', 'ambiguous-value', uri, span, message, { suggestions });
  }

  private intendedReading(text: string, letter: string): { value: number; convention: string } | undefined {
    switch (letter.toUpperCase()) {
      case 'R':
      case 'C': {
        const value = readMarkingCode(text, letter);
        return value === undefined ? undefined : { value, convention: 'as a marking code (IEC 60062)' };
      }
      case 'L': {
        // Inductors are marked like capacitors: the letter (n, u, m) is the decimal point and the scale.
        const value = readMarkingCode(text, 'C');
        return value === undefined ? undefined : { value, convention: 'as a marking code (IEC 60062)' };
      }
      case 'V': {
        // `3V3` for 3.3 V: how supply rails are named on schematics (common practice, no source).
        const match = /^(\d+)v(\d+)$/i.exec(text);
        return match ? { value: Number(`${match[1]}.${match[2]}`), convention: 'written as a rail name' } : undefined;
      }
      default: {
        // Without an element to go by, only the letters that mean the same in both
        // readings are offered: R (×1) and k (×1000).
        if (!/^\d*[rk]\d+$/i.test(text)) return undefined;
        const value = readMarkingCode(text, 'R');
        return value === undefined ? undefined : { value, convention: 'as a resistor marking code (IEC 60062)' };
      }
    }
  }
}
