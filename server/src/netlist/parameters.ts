// Parameter scopes: global `.param`s, a subcircuit instance's parameters
// (instance overrides, then the subcircuit's defaults), and the `.param`s in
// its body. Values are evaluated lazily, on first use, which evaluates them in
// dependency order whatever order they were written in; a cycle is reported at
// the `.param` where it closes.
import type { Field, Span } from '@pnlint/grammar';
import { isAmbiguousNumber, readSpiceNumber } from '@pnlint/grammar';
import type { DiagnosticSink } from './diagnostics.js';
import { FAILED, evaluateExpression, type EvaluationContext, type ExpressionScope, type UserFunction } from './expressions.js';

interface Definition {
  /** As written. */
  name: string;
  field: Field | undefined;
  uri: string;
  /** The `name=value` text: where a cycle is reported. */
  span: Span;
  state: 'pending' | 'evaluating' | 'done' | 'failed';
  value: number | undefined;
  /** Instance overrides are not replaced by a `.param` of the same name in the body. */
  fixed: boolean;
  scope: ParameterScope;
}

/** Shared by all scopes of one elaboration: the chain of parameters being evaluated. */
export class ParameterEvaluation {
  readonly stack: Definition[] = [];
  constructor(
    readonly sink: DiagnosticSink,
    /**
     * Reports ambiguous numbers (`4k7`) wherever they are read. `inExpression` is true inside
     * `{…}` and in `.param` values, where ngspice refuses them instead of truncating.
     */
    readonly onNumber: (uri: string, text: string, span: Span, letter: string, inExpression: boolean) => void,
  ) {}
}

export class ParameterScope implements ExpressionScope {
  private readonly definitions = new Map<string, Definition>();
  private readonly functions = new Map<string, UserFunction>();

  constructor(
    readonly parent: ParameterScope | undefined,
    readonly evaluation: ParameterEvaluation,
  ) {}

  child(): ParameterScope {
    return new ParameterScope(this, this.evaluation);
  }

  /** A parameter with a known value (an instance override, evaluated in the caller's scope). */
  setValue(name: string, value: number | undefined, uri: string, span: Span, fixed = false): void {
    const key = name.toLowerCase();
    if (this.definitions.get(key)?.fixed) return;
    this.definitions.set(key, {
      name,
      field: undefined,
      uri,
      span,
      state: value === undefined ? 'failed' : 'done',
      value,
      fixed,
      scope: this,
    });
  }

  /** A parameter evaluated on first use, in this scope. A later definition of the same name replaces an earlier one. */
  define(name: string, field: Field, uri: string, span: Span): void {
    const key = name.toLowerCase();
    if (this.definitions.get(key)?.fixed) return;
    this.definitions.set(key, { name, field, uri, span, state: 'pending', value: undefined, fixed: false, scope: this });
  }

  defineFunction(fn: UserFunction): void {
    this.functions.set(fn.name.toLowerCase(), fn);
  }

  /** True when this very scope (not a parent) defines `name`. */
  hasOwn(name: string): boolean {
    return this.definitions.has(name.toLowerCase());
  }

  parameter(name: string): number | typeof FAILED | undefined {
    const definition = this.definitions.get(name);
    if (!definition) return this.parent?.parameter(name);
    return this.resolve(definition);
  }

  userFunction(name: string): UserFunction | undefined {
    return this.functions.get(name) ?? this.parent?.userFunction(name);
  }

  /** Every parameter's value in this scope and its parents (for hovers and tests). */
  values(): Map<string, number> {
    const result = this.parent ? this.parent.values() : new Map<string, number>();
    for (const [key, definition] of this.definitions) {
      const value = this.resolve(definition);
      if (typeof value === 'number') result.set(key, value);
      else result.delete(key);
    }
    return result;
  }

  /** Evaluates a value field (number, `{expression}`, or a bare parameter name) in this scope. */
  evaluateField(field: Field, uri: string, letter = ''): number | undefined {
    return evaluateFieldIn(this, field, uri, letter);
  }

  private resolve(definition: Definition): number | typeof FAILED {
    switch (definition.state) {
      case 'done':
        return definition.value!;
      case 'failed':
        return FAILED;
      case 'evaluating':
        this.reportCycle(definition);
        return FAILED;
      case 'pending':
        break;
    }
    const stack = this.evaluation.stack;
    definition.state = 'evaluating';
    stack.push(definition);
    const value = evaluateFieldIn(definition.scope, definition.field!, definition.uri, '', true);
    stack.pop();
    // A cycle found while evaluating marks this definition failed already.
    if (definition.state === 'evaluating') {
      definition.state = value === undefined ? 'failed' : 'done';
      definition.value = value;
    }
    return definition.state === 'done' ? definition.value! : FAILED;
  }

  private reportCycle(closing: Definition): void {
    const stack = this.evaluation.stack;
    const cycle = stack.slice(stack.indexOf(closing));
    for (const member of cycle) member.state = 'failed';
    const chain = [...cycle.map((d) => d.name), closing.name].join(' → ');
    this.evaluation.sink.error(closing.uri, closing.span, `parameter ${closing.name} depends on itself: ${chain}`, {
      related: cycle
        .filter((d) => d !== closing)
        .map((d) => ({ location: this.evaluation.sink.location(d.uri, d.span), message: `${d.name} is defined here` })),
    });
  }
}

/** What the expression evaluator needs; made only for expressions and names, not for the plain numbers most fields hold. */
function expressionContext(scope: ParameterScope, uri: string, letter: string): EvaluationContext {
  const evaluation = scope.evaluation;
  return {
    scope,
    uri,
    sink: evaluation.sink,
    onNumber: (text, span) => evaluation.onNumber(uri, text, span, letter, true),
  };
}

function evaluateFieldIn(scope: ParameterScope, field: Field, uri: string, letter: string, isParameter = false): number | undefined {
  const evaluation = scope.evaluation;
  switch (field.kind) {
    case 'number':
      evaluation.onNumber(uri, field.text, field.span, letter, isParameter);
      return field.value;
    case 'expression':
      // An expression that does not parse already has its syntax diagnostic.
      return field.expr ? evaluateExpression(field.expr, expressionContext(scope, uri, letter)) : undefined;
    case 'word': {
      const number = readSpiceNumber(field.text);
      if (number) {
        evaluation.onNumber(uri, field.text, field.span, letter, isParameter);
        return number.value;
      }
      return evaluateExpression({ kind: 'ident', name: field.text, span: field.span }, expressionContext(scope, uri, letter));
    }
    case 'assign':
    case 'group':
      evaluation.sink.error(uri, field.span, `expected a value, found ${field.kind === 'assign' ? 'an assignment' : 'a list in parentheses'}`);
      return undefined;
  }
}

/** True when `text` is a number whose ignored tail holds a digit (`4k7`). */
export function isAmbiguousText(text: string): boolean {
  const reading = readSpiceNumber(text);
  return reading !== undefined && isAmbiguousNumber(reading);
}
