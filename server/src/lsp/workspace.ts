// The server's side of the I/O boundary: workspace folders, the file reader that
// the core reads includes through (open editors' text first, then the disk), the
// restricted mode of untrusted workspaces, and finding the governing pnlint.json.
import { readFileSync, statSync } from 'node:fs';
import { dirname, isAbsolute, join, resolve, sep } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import type { FileReader } from '../netlist/circuit.js';

/** An editor's document, as far as reading it goes. */
export interface OpenDocument {
  readonly uri: string;
  readonly version: number;
  getText(): string;
}

/** The open documents (the server's TextDocuments, or a snapshot of them in the analysis worker). */
export interface DocumentSource {
  get(uri: string): OpenDocument | undefined;
  all(): OpenDocument[];
}

export const CONFIG_FILE_NAME = 'pnlint.json';

/** Files larger than this are not read as includes: no netlist is that big, and a mistaken include of a binary should not stall the editor. */
const LARGEST_INCLUDE_BYTES = 64 * 1024 * 1024;

/** The local path of a `file:` uri, or undefined for other schemes (`untitled:`, …). */
export function uriToPath(uri: string): string | undefined {
  if (!uri.startsWith('file:')) return undefined;
  try {
    return fileURLToPath(uri);
  } catch {
    return undefined;
  }
}

/**
 * One spelling per file, to compare uris from different sources (the client writes
 * `file:///c%3A/x`, Node writes `file:///C:/x`). Drive letters fold to lower case.
 */
export function uriKey(uri: string): string {
  const path = uriToPath(uri);
  if (path === undefined) return uri;
  return /^[A-Za-z]:/.test(path) ? path[0]!.toLowerCase() + path.slice(1) : path;
}

function isInside(path: string, folder: string): boolean {
  const withSeparator = folder.endsWith(sep) ? folder : folder + sep;
  const fold = (p: string) => (/^[A-Za-z]:/.test(p) ? p[0]!.toLowerCase() + p.slice(1) : p);
  return fold(path) === fold(folder) || fold(path).startsWith(fold(withSeparator));
}

export class Workspace {
  /** Workspace folder paths, as the client gave them. */
  private folders: string[] = [];
  /** Set from the client in an untrusted workspace: no include outside the folders is read. */
  restricted = false;

  constructor(private readonly documents: DocumentSource) {}

  /** The workspace folders as `file:` uris. */
  folderUris(): string[] {
    return this.folders.map((folder) => pathToFileURL(folder).href);
  }

  setFolders(uris: readonly string[]): void {
    this.folders = uris.map(uriToPath).filter((path): path is string => path !== undefined);
  }

  addFolders(added: readonly string[], removed: readonly string[]): void {
    const removedPaths = new Set(removed.map(uriToPath));
    this.folders = this.folders.filter((folder) => !removedPaths.has(folder));
    for (const path of added.map(uriToPath)) if (path !== undefined && !this.folders.includes(path)) this.folders.push(path);
  }

  /** The innermost workspace folder holding `path` (multi-root workspaces may nest). */
  folderOf(path: string): string | undefined {
    let best: string | undefined;
    for (const folder of this.folders) if (isInside(path, folder) && (!best || folder.length > best.length)) best = folder;
    return best;
  }

  /** The open document for `uri`, however the uri is spelled. */
  openDocument(uri: string): OpenDocument | undefined {
    const exact = this.documents.get(uri);
    if (exact) return exact;
    const key = uriKey(uri);
    return this.documents.all().find((document) => uriKey(document.uri) === key);
  }

  /** The `file:` uri of the workspace folder holding `uri`, if any. */
  folderUriOf(uri: string): string | undefined {
    const path = uriToPath(uri);
    const folder = path === undefined ? undefined : this.folderOf(path);
    return folder === undefined ? undefined : pathToFileURL(folder).href;
  }

  /** Why `uri` may not be read in restricted mode, or undefined when it may. */
  refusal(uri: string): string | undefined {
    if (!this.restricted) return undefined;
    const path = uriToPath(uri);
    if (path !== undefined && this.folderOf(path) !== undefined) return undefined;
    return 'not read: the workspace is untrusted, and the file is outside its folders';
  }

  /**
   * A file reader for one analysis: open documents' text first, then the disk. It
   * records what it read and at which document version, so that a result can be
   * matched against the texts it was computed from.
   */
  createReader(log: (message: string) => void): TrackingReader {
    return new TrackingReader(this, log);
  }

  /** Reads a file from an open editor, else from disk; undefined when it cannot be read. */
  readText(uri: string): { text: string; version: number | undefined } | undefined {
    const open = this.openDocument(uri);
    if (open) return { text: open.getText(), version: open.version };
    const path = uriToPath(uri);
    if (path === undefined) return undefined;
    try {
      if (statSync(path).size > LARGEST_INCLUDE_BYTES) return undefined;
      return { text: readFileSync(path, 'utf8'), version: undefined };
    } catch {
      return undefined;
    }
  }

  /** The pnlint.json that governs `uri`: at the root of its workspace folder, else beside the file. */
  configUriFor(uri: string): string | undefined {
    const path = uriToPath(uri);
    if (path === undefined) return undefined;
    const folder = this.folderOf(path) ?? dirname(path);
    return pathToFileURL(join(folder, CONFIG_FILE_NAME)).href;
  }

  readConfig(uri: string): { uri: string; text: string } | undefined {
    const configUri = this.configUriFor(uri);
    if (configUri === undefined || this.refusal(configUri)) return undefined;
    const found = this.readText(configUri);
    return found ? { uri: configUri, text: found.text } : undefined;
  }
}

export class TrackingReader implements FileReader {
  /** uri as read → the open document's version then (undefined: read from disk or not found). */
  readonly versions = new Map<string, number | undefined>();
  /** Every uri asked for, read or not: a file that appears later must also trigger a re-check. */
  readonly asked = new Set<string>();

  constructor(
    private readonly workspace: Workspace,
    private readonly log: (message: string) => void,
  ) {}

  read(uri: string): string | undefined {
    this.asked.add(uriKey(uri));
    const refusal = this.workspace.refusal(uri);
    if (refusal) {
      this.log(`${uri}: ${refusal}`);
      return undefined;
    }
    const found = this.workspace.readText(uri);
    this.versions.set(uri, found?.version);
    return found?.text;
  }

  resolve(fromUri: string, path: string): string {
    const fromPath = uriToPath(fromUri);
    const unquoted = path.replace(/^["']|["']$/g, '');
    if (isAbsolute(unquoted)) return pathToFileURL(unquoted).href;
    if (fromPath === undefined) {
      // An unsaved document has no folder: a relative include cannot be found from it.
      try {
        return new URL(unquoted, fromUri).href;
      } catch {
        return unquoted;
      }
    }
    // Use the open document's spelling of the uri when there is one, so findings land in that editor.
    const resolved = pathToFileURL(resolve(dirname(fromPath), unquoted)).href;
    return this.workspace.openDocument(resolved)?.uri ?? resolved;
  }
}
