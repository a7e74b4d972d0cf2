// Nests the bodies of `.subckt`…`.ends`, `.lib section`…`.endl` and
// `.if`…`.elseif`…`.else`…`.endif` (any depth), and reports closers with nothing
// to close and blocks left open.

import type { IfStatement, LibSectionStatement, ParseDiagnostic, Range, Statement, SubcktStatement } from './ast.js';
import type { BlockMarker, LineResult } from './statements.js';

type Block = SubcktStatement | LibSectionStatement | IfStatement;

interface OpenBlock {
  block: Block;
  /** Where the current body goes (for an `.if`, its latest branch). */
  body: Statement[];
  /** Where a missing closer is reported: the subcircuit's or section's name, the `.if`. */
  reportAt: Range;
  sawElse: boolean;
}

const CLOSER: Readonly<Record<Block['kind'], string>> = { subckt: '.ends', libSection: '.endl', if: '.endif' };

function lastEnd(body: Statement[], fallback: Range): Range['end'] {
  const last = body[body.length - 1];
  return last && last.range.end.offset > fallback.end.offset ? last.range.end : fallback.end;
}

export function nestBlocks(items: readonly LineResult[], diagnostics: ParseDiagnostic[]): Statement[] {
  const root: Statement[] = [];
  const stack: OpenBlock[] = [];
  const error = (message: string, range: Range): void => {
    diagnostics.push({ severity: 'error', code: 'syntax', message, range });
  };

  const add = (statement: Statement): void => {
    (stack.length > 0 ? stack[stack.length - 1]!.body : root).push(statement);
  };

  /** Closes the innermost block of `kind`, reporting the blocks inside it left open. */
  const close = (kind: Block['kind'], marker: BlockMarker): OpenBlock | undefined => {
    let depth = stack.length - 1;
    while (depth >= 0 && stack[depth]!.block.kind !== kind) depth--;
    // `.ends outer` closes `outer` even when a subcircuit inside it was left open.
    const name = marker.name?.text.toLowerCase();
    if (kind === 'subckt' && name !== undefined) {
      for (let at = stack.length - 1; at >= 0; at--) {
        const block = stack[at]!.block;
        if (block.kind === 'subckt' && block.name.text.toLowerCase() === name) {
          depth = at;
          break;
        }
      }
    }
    if (depth < 0) return undefined;
    while (stack.length - 1 > depth) leaveOpen(stack.pop()!);
    const open = stack.pop()!;
    finishBranch(open);
    open.block.range = { start: open.block.range.start, end: marker.range.end };
    return open;
  };

  const finishBranch = (open: OpenBlock): void => {
    if (open.block.kind !== 'if') return;
    const branch = open.block.branches[open.block.branches.length - 1]!;
    branch.range = { start: branch.range.start, end: lastEnd(branch.body, branch.range) };
  };

  const leaveOpen = (open: OpenBlock): void => {
    const block = open.block;
    const what = block.kind === 'if' ? '`.if`' : block.kind === 'subckt' ? `\`.subckt ${block.name.text}\`` : `\`.lib ${block.name.text}\``;
    error(`${what} has no \`${CLOSER[block.kind]}\``, open.reportAt);
    finishBranch(open);
    const body = block.kind === 'if' ? block.branches[block.branches.length - 1]!.body : block.body;
    block.range = { start: block.range.start, end: lastEnd(body, block.range) };
  };

  for (const item of items) {
    if (!item) continue;
    if (item.kind !== 'marker') {
      add(item);
      if (item.kind === 'subckt' || item.kind === 'libSection') {
        stack.push({ block: item, body: item.body, reportAt: item.name.range, sawElse: false });
      } else if (item.kind === 'if') {
        // The `.if` word itself, three characters at the statement's start.
        const start = item.range.start;
        const reportAt = { start, end: { line: start.line, column: start.column + 3, offset: start.offset + 3 } };
        stack.push({ block: item, body: item.branches[0]!.body, reportAt, sawElse: false });
      }
      continue;
    }
    switch (item.command) {
      case 'ends': {
        const open = close('subckt', item);
        if (!open) error('`.ends` without a `.subckt` to close', item.commandRange);
        else {
          const subckt = open.block as SubcktStatement;
          subckt.ends = item.range;
          if (item.name && item.name.text.toLowerCase() !== subckt.name.text.toLowerCase()) {
            diagnostics.push({
              severity: 'warning',
              code: 'syntax',
              message: `\`.ends ${item.name.text}\` closes \`.subckt ${subckt.name.text}\``,
              range: item.name.range,
            });
          }
        }
        break;
      }
      case 'endl': {
        const open = close('libSection', item);
        if (!open) error('`.endl` without a `.lib` section to close', item.commandRange);
        else (open.block as LibSectionStatement).endl = item.range;
        break;
      }
      case 'endif': {
        const open = close('if', item);
        if (!open) error('`.endif` without an `.if` to close', item.commandRange);
        else (open.block as IfStatement).endif = item.range;
        break;
      }
      case 'elseif':
      case 'else': {
        let depth = stack.length - 1;
        while (depth >= 0 && stack[depth]!.block.kind !== 'if') depth--;
        if (depth < 0) {
          error(`\`.${item.command}\` without an \`.if\``, item.commandRange);
          break;
        }
        while (stack.length - 1 > depth) leaveOpen(stack.pop()!);
        const open = stack[depth]!;
        if (open.sawElse) error(`\`.${item.command}\` after \`.else\``, item.commandRange);
        if (item.command === 'else') open.sawElse = true;
        finishBranch(open);
        const branch = { condition: item.condition, body: [] as Statement[], range: item.range };
        (open.block as IfStatement).branches.push(branch);
        open.body = branch.body;
        break;
      }
    }
  }
  while (stack.length > 0) leaveOpen(stack.pop()!);
  return root;
}
