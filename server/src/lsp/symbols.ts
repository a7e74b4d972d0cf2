// The outline: subcircuits with their contents, elements, models, parameters,
// includes and library sections, in source order.
import type { LineIndex, Statement } from '@pnlint/grammar';
import { SymbolKind, type DocumentSymbol, type DocumentSymbolParams } from 'vscode-languageserver';
import type { FeatureContext } from './context.js';
import { lspRangeOf } from './positions.js';
import { fieldText } from './syntax.js';

/** Outline icons by element letter: sources and semiconductors stand out from passives. */
const ELEMENT_SYMBOL_KINDS: Readonly<Record<string, SymbolKind>> = {
  V: SymbolKind.Event,
  I: SymbolKind.Event,
  D: SymbolKind.Field,
  Q: SymbolKind.Field,
  M: SymbolKind.Field,
  X: SymbolKind.Object,
};

export function documentSymbols(context: FeatureContext, params: DocumentSymbolParams): DocumentSymbol[] {
  const document = context.documents.get(params.textDocument.uri);
  if (!document) return [];
  const syntax = context.syntax(document);
  return symbolsOf(syntax.statements, syntax.lines);
}

function symbolsOf(statements: readonly Statement[], lines: LineIndex): DocumentSymbol[] {
  const symbols: DocumentSymbol[] = [];
  for (const statement of statements) {
    const range = lspRangeOf(lines, statement.span);
    switch (statement.kind) {
      case 'element':
        symbols.push({
          name: statement.name.text,
          detail: statement.fields.map(fieldText).join(' '),
          kind: ELEMENT_SYMBOL_KINDS[statement.letter] ?? SymbolKind.Variable,
          range,
          selectionRange: lspRangeOf(lines, statement.name.span),
        });
        break;
      case 'model':
        symbols.push({ name: statement.name.text, detail: `.model ${statement.type.text}`, kind: SymbolKind.Class, range, selectionRange: lspRangeOf(lines, statement.name.span) });
        break;
      case 'subckt':
        symbols.push({
          name: statement.name.text,
          detail: `.subckt ${statement.ports.map((port) => port.text).join(' ')}`,
          kind: SymbolKind.Module,
          range,
          selectionRange: lspRangeOf(lines, statement.name.span),
          children: symbolsOf(statement.body, lines),
        });
        break;
      case 'libSection':
        symbols.push({ name: statement.name.text, detail: '.lib section', kind: SymbolKind.Namespace, range, selectionRange: lspRangeOf(lines, statement.name.span), children: symbolsOf(statement.body, lines) });
        break;
      case 'param':
        for (const assign of statement.assigns) {
          symbols.push({ name: assign.key.text, detail: `.param = ${fieldText(assign.value)}`, kind: SymbolKind.Constant, range: lspRangeOf(lines, assign.span), selectionRange: lspRangeOf(lines, assign.key.span) });
        }
        break;
      case 'func':
        symbols.push({ name: statement.name.text, detail: '.func', kind: SymbolKind.Function, range, selectionRange: lspRangeOf(lines, statement.name.span) });
        break;
      case 'include':
      case 'libReference':
        symbols.push({ name: statement.path, detail: statement.kind === 'include' ? '.include' : `.lib ${statement.section.text}`, kind: SymbolKind.File, range, selectionRange: lspRangeOf(lines, statement.pathSpan) });
        break;
      case 'if':
        // Conditional blocks are not outline entries of their own; their contents are.
        for (const branch of statement.branches) symbols.push(...symbolsOf(branch.body, lines));
        break;
      default:
        break;
    }
  }
  return symbols;
}
