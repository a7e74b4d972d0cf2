export * from './ast.js';
export * from './values.js';
export { parse } from './parser.js';
export { LineIndex } from './positions.js';
