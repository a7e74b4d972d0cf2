// Nests the bodies of `.subckt`…`.ends`, `.lib section`…`.endl` and
// `.if`…`.elseif`…`.else`…`.endif` (any depth), and reports closers with nothing
// to close and blocks left open.

import type { IfStatement, LibSectionStatement, Span, Statement, SubcktStatement } from './ast.js';
import type { BlockMarker, LineResult, SpanDiagnostic } from './statements.js';

type Block = SubcktStatement | LibSectionStatement | IfStatement;

interface OpenBlock {
  block: Block;
  /** Where the current body goes (for an `.if`, its latest branch). */
  body: Statement[];
  /** Where a missing closer is reported: the subcircuit's or section's name, the `.if`. */
  reportAt: Span;
  sawElse: boolean;
}

const CLOSER: Readonly<Record<Block['kind'], string>> = { subckt: '.ends', libSection: '.endl', if: '.endif' };

function lastEnd(body: Statement[], fallback: Span): number {
  const last = body[body.length - 1];
  return last && last.span.end > fallback.end ? last.span.end : fallback.end;
}

export function nestBlocks(items: readonly LineResult[], diagnostics: SpanDiagnostic[]): Statement[] {
  const root: Statement[] = [];
  const stack: OpenBlock[] = [];
  // How many blocks of each kind are open, and where each open subcircuit sits by name:
  // a closer with nothing to close, or a `.ends name`, is then found without a scan, so
  // that the pass stays linear however deep the nesting.
  const openCount: Record<Block['kind'], number> = { subckt: 0, libSection: 0, if: 0 };
  const subcircuitDepths = new Map<string, number[]>();
  const error = (message: string, span: Span): void => {
    diagnostics.push({ severity: 'error', code: 'syntax', message, span });
  };

  const add = (statement: Statement): void => {
    (stack.length > 0 ? stack[stack.length - 1]!.body : root).push(statement);
  };

  const open = (entry: OpenBlock): void => {
    openCount[entry.block.kind]++;
    if (entry.block.kind === 'subckt') {
      const name = entry.block.name.text.toLowerCase();
      const depths = subcircuitDepths.get(name);
      if (depths) depths.push(stack.length);
      else subcircuitDepths.set(name, [stack.length]);
    }
    stack.push(entry);
  };

  const pop = (): OpenBlock => {
    const entry = stack.pop()!;
    openCount[entry.block.kind]--;
    if (entry.block.kind === 'subckt') subcircuitDepths.get(entry.block.name.text.toLowerCase())!.pop();
    return entry;
  };

  /** The depth of the innermost open block of `kind`; only called when one is open. */
  const innermost = (kind: Block['kind']): number => {
    let depth = stack.length - 1;
    while (stack[depth]!.block.kind !== kind) depth--;
    return depth;
  };

  /** Closes the innermost block of `kind`, reporting the blocks inside it left open. */
  const close = (kind: Block['kind'], marker: BlockMarker): OpenBlock | undefined => {
    if (openCount[kind] === 0) return undefined;
    let depth: number | undefined;
    // `.ends outer` closes `outer` even when a subcircuit inside it was left open.
    if (kind === 'subckt' && marker.name) depth = subcircuitDepths.get(marker.name.text.toLowerCase())?.at(-1);
    depth ??= innermost(kind);
    while (stack.length - 1 > depth) leaveOpen(pop());
    const entry = pop();
    finishBranch(entry);
    entry.block.span = { start: entry.block.span.start, end: marker.span.end };
    return entry;
  };

  const finishBranch = (open: OpenBlock): void => {
    if (open.block.kind !== 'if') return;
    const branch = open.block.branches[open.block.branches.length - 1]!;
    branch.span = { start: branch.span.start, end: lastEnd(branch.body, branch.span) };
  };

  const leaveOpen = (open: OpenBlock): void => {
    const block = open.block;
    const what = block.kind === 'if' ? '`.if`' : block.kind === 'subckt' ? `\`.subckt ${block.name.text}\`` : `\`.lib ${block.name.text}\``;
    error(`${what} has no \`${CLOSER[block.kind]}\``, open.reportAt);
    finishBranch(open);
    const body = block.kind === 'if' ? block.branches[block.branches.length - 1]!.body : block.body;
    block.span = { start: block.span.start, end: lastEnd(body, block.span) };
  };

  for (const item of items) {
    if (!item) continue;
    if (item.kind !== 'marker') {
      add(item);
      if (item.kind === 'subckt' || item.kind === 'libSection') {
        open({ block: item, body: item.body, reportAt: item.name.span, sawElse: false });
      } else if (item.kind === 'if') {
        // The `.if` word itself, three characters at the statement's start.
        const start = item.span.start;
        const reportAt = { start, end: start + 3 };
        open({ block: item, body: item.branches[0]!.body, reportAt, sawElse: false });
      }
      continue;
    }
    switch (item.command) {
      case 'ends': {
        const open = close('subckt', item);
        if (!open) error('`.ends` without a `.subckt` to close', item.commandSpan);
        else {
          const subckt = open.block as SubcktStatement;
          subckt.ends = item.span;
          if (item.name && item.name.text.toLowerCase() !== subckt.name.text.toLowerCase()) {
            diagnostics.push({
              severity: 'warning',
              code: 'syntax',
              message: `\`.ends ${item.name.text}\` closes \`.subckt ${subckt.name.text}\``,
              span: item.name.span,
            });
          }
        }
        break;
      }
      case 'endl': {
        const open = close('libSection', item);
        if (!open) error('`.endl` without a `.lib` section to close', item.commandSpan);
        else (open.block as LibSectionStatement).endl = item.span;
        break;
      }
      case 'endif': {
        const open = close('if', item);
        if (!open) error('`.endif` without an `.if` to close', item.commandSpan);
        else (open.block as IfStatement).endif = item.span;
        break;
      }
      case 'elseif':
      case 'else': {
        if (openCount.if === 0) {
          error(`\`.${item.command}\` without an \`.if\``, item.commandSpan);
          break;
        }
        const depth = innermost('if');
        while (stack.length - 1 > depth) leaveOpen(pop());
        const entry = stack[depth]!;
        if (entry.sawElse) error(`\`.${item.command}\` after \`.else\``, item.commandSpan);
        if (item.command === 'else') entry.sawElse = true;
        finishBranch(entry);
        const branch = { condition: item.condition, body: [] as Statement[], span: item.span };
        (entry.block as IfStatement).branches.push(branch);
        entry.body = branch.body;
        break;
      }
    }
  }
  while (stack.length > 0) leaveOpen(pop());
  return root;
}
