// New element, node and model names for inserted lines, chosen so that they collide with
// nothing in any file of the circuit: SPICE compares names without regard to case, and a
// name inside a subcircuit must not meet its ports, its own nodes or a global node. The
// names taken are gathered generously (every word on every element line counts as a
// possible node), so a new name can only ever be too careful.
import type { Circuit } from '../netlist/circuit.js';
import { forEachStatement, type SourceFiles } from './source-text.js';

type Namespace = 'element' | 'node' | 'model';

/** The last part of a hierarchical name: `X2.D1` → `D1`. */
export function leafName(name: string): string {
  const dot = name.lastIndexOf('.');
  return dot < 0 ? name : name.slice(dot + 1);
}

/** The instance prefix of a hierarchical name: `X2.D1` → `X2.`, `D1` → ``. */
export function instancePrefix(name: string): string {
  const dot = name.lastIndexOf('.');
  return dot < 0 ? '' : name.slice(0, dot + 1);
}

export class NameRegistry {
  /** `inherited`: the registry this one was copied from, read through rather than duplicated (it takes no names after it is copied). */
  private constructor(
    private readonly taken: Record<Namespace, Set<string>>,
    private readonly inherited?: NameRegistry,
  ) {}

  static of(circuit: Circuit, files: SourceFiles): NameRegistry {
    const registry = new NameRegistry({ element: new Set(), node: new Set(), model: new Set() });
    for (const element of circuit.elements) registry.take('element', leafName(element.name));
    for (const node of circuit.nodes) registry.take('node', leafName(node));
    for (const key of circuit.models.keys()) registry.take('model', leafName(key));
    for (const uri of files.uris()) {
      forEachStatement(files.statements(uri), (statement) => {
        switch (statement.kind) {
          case 'element':
            registry.take('element', statement.name.text);
            for (const field of statement.fields) {
              if (field.kind === 'word' || field.kind === 'number') registry.take('node', field.text);
            }
            break;
          case 'subckt':
            for (const port of statement.ports) registry.take('node', port.text);
            break;
          case 'global':
            for (const node of statement.nodes) registry.take('node', node.text);
            break;
          case 'model':
            registry.take('model', statement.name.text);
            break;
          default:
            break;
        }
      });
    }
    return registry;
  }

  /**
   * A copy to draw from, so that each fix picks its names against the original circuit alone.
   * A layer over this registry, not a duplicate of it: a board's thousands of fixes each take
   * a copy of thousands of names.
   */
  copy(): NameRegistry {
    return new NameRegistry({ element: new Set(), node: new Set(), model: new Set() }, this);
  }

  /** `base`, else `base_2`, `base_3`, …: the first that no name of its kind has; it is then taken. */
  fresh(namespace: Namespace, base: string): string {
    let name = base;
    for (let index = 2; this.has(namespace, name.toLowerCase()); index++) name = `${base}_${index}`;
    this.take(namespace, name);
    return name;
  }

  private has(namespace: Namespace, lowerCased: string): boolean {
    return this.taken[namespace].has(lowerCased) || (this.inherited?.has(namespace, lowerCased) ?? false);
  }

  private take(namespace: Namespace, name: string): void {
    this.taken[namespace].add(name.toLowerCase());
  }
}
