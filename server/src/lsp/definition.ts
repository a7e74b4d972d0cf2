// Go to definition: of a model or subcircuit reference, of a parameter used in an
// expression, and of the file an `.include` or `.lib` line names.
import type { DefinitionParams, Location } from 'vscode-languageserver';
import type { FeatureContext } from './context.js';
import { spanContains, toLspRange } from './positions.js';
import { findTarget, instanceSubcircuit, modelName, parameterName, resolveName, subcircuitName, type Definition } from './syntax.js';

const START_OF_FILE = { start: { line: 0, character: 0 }, end: { line: 0, character: 0 } };

function locationOf(definition: Definition<unknown> | undefined): Location[] | null {
  return definition ? [{ uri: definition.uri, range: toLspRange(definition.nameRange) }] : null;
}

export function definition(context: FeatureContext, params: DefinitionParams): Location[] | null {
  const document = context.documents.get(params.textDocument.uri);
  if (!document) return null;
  const syntax = context.syntax(document);
  const target = findTarget(syntax, params.position);
  if (!target) return null;
  const { statement, field } = target;
  const offset = syntax.lines.offsetAt(params.position.line, params.position.character);

  if ((statement.kind === 'include' || statement.kind === 'libReference') && spanContains(statement.pathSpan, offset)) {
    const reader = context.workspace.createReader((message) => context.log(message));
    const uri = reader.resolve(document.uri, statement.path);
    return reader.read(uri) === undefined ? null : [{ uri, range: START_OF_FILE }];
  }
  const index = context.index(document);
  if (target.identifier) return locationOf(resolveName(index.parameters, target.identifier.name, target.scope, parameterName));
  if (!field || (field.kind !== 'word' && field.kind !== 'number')) return null;
  if (statement.kind === 'element') {
    if (statement.letter === 'X' && field === instanceSubcircuit(statement)) {
      return locationOf(resolveName(index.subcircuits, field.text, target.scope, subcircuitName));
    }
    if (field !== statement.name) return locationOf(resolveName(index.models, field.text, target.scope, modelName));
  }
  return null;
}
