// Path containment for restricted (untrusted) workspaces: is a resolved include
// inside the workspace folder? Works on plain paths and on `scheme://` URIs.

/** Splits `file:///a/b` into `file://` and `/a/b`; a plain path has no scheme. */
function splitScheme(uri: string): { scheme: string; path: string } {
  const match = /^([a-z][a-z0-9+.-]*:\/\/[^/]*)(.*)$/i.exec(uri);
  return match ? { scheme: match[1]!.toLowerCase(), path: match[2]! } : { scheme: '', path: uri };
}

/** Folds `.` and `..` segments and repeated or back slashes, so that `root/../x` cannot pass as inside `root`. */
function normalizeSegments(path: string): string[] {
  const segments: string[] = [];
  for (const segment of decodeSafely(path).replace(/\\/g, '/').split('/')) {
    if (segment === '' || segment === '.') continue;
    if (segment === '..') segments.pop();
    else segments.push(segment);
  }
  return segments;
}

function decodeSafely(text: string): string {
  try {
    return decodeURIComponent(text);
  } catch {
    return text;
  }
}

/** True when `uri` is `root` or lies below it. */
export function isWithin(uri: string, root: string): boolean {
  const target = splitScheme(uri);
  const folder = splitScheme(root);
  if (target.scheme !== folder.scheme) return false;
  const targetSegments = normalizeSegments(target.path);
  const folderSegments = normalizeSegments(folder.path);
  if (targetSegments.length < folderSegments.length) return false;
  return folderSegments.every((segment, i) => segment === targetSegments[i]);
}
