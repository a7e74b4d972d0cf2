// Where each rule's page lives, so that a diagnostic can link to it. The pages are
// `server/docs/rules/<id>.md`; the extension ships them as `<extension>/docs/rules/`
// beside its bundle. Searched relative to the running script: `../docs/rules` (the
// bundle in `<extension>/dist/`), then `../../docs/rules` (`server/dist/lsp/` or
// `server/dist/cli/` in the repository).
import { existsSync, realpathSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

export class RulePages {
  private readonly pages = new Map<string, string | undefined>();
  private readonly directory: string | undefined;

  /** `directory` overrides the search (for embedders that ship the pages elsewhere). */
  constructor(directory?: string) {
    this.directory = directory ?? RulePages.search();
  }

  private static search(): string | undefined {
    const script = process.argv[1];
    if (!script) return undefined;
    let here: string;
    try {
      here = dirname(realpathSync(script));
    } catch {
      here = dirname(resolve(script));
    }
    return [join(here, '..', 'docs', 'rules'), join(here, '..', '..', 'docs', 'rules')].find((candidate) => existsSync(candidate));
  }

  /** The `file:` uri of the rule's page, or undefined when it has none (no broken links). */
  uriOf(rule: string): string | undefined {
    if (!/^[a-z0-9-]+$/.test(rule) || !this.directory) return undefined;
    if (!this.pages.has(rule)) {
      const page = join(this.directory, `${rule}.md`);
      this.pages.set(rule, existsSync(page) ? pathToFileURL(page).href : undefined);
    }
    return this.pages.get(rule);
  }
}
