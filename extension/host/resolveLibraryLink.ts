/**
 * Where a library entry's postmortem or export path points, decided before anything is opened:
 * the library is a shared file anyone can edit, and a click in the viewer must not open a file
 * outside the workspace (or a web link) on the strength of that text. Pure: node:path only.
 */
import * as path from 'node:path';
import { fileURLToPath } from 'node:url';

/** A link that resolves to a path inside the workspace folder, or why it does not. */
export type LibraryLinkTarget =
  | { readonly kind: 'inside'; readonly absolutePath: string }
  | { readonly kind: 'outside'; readonly reason: string };

/** URI scheme per RFC 3986 §3.1; one letter is left out because `C:\…` is a Windows drive, not a scheme. */
const URI_SCHEME = /^([A-Za-z][A-Za-z0-9+.-]+):/;

type PathApi = typeof path.posix | typeof path.win32;

/**
 * Resolve `link` (as stored in the library: workspace-relative path, absolute path or `file:` URI)
 * against `workspaceRoot` and check that it lands inside that folder. `.`/`..` segments are
 * resolved first, so `postmortems/../../etc/passwd` is outside. Other URI schemes (http, https…),
 * an empty link and the folder itself are "outside", with a reason a person can act on.
 * `pathApi` picks POSIX or Windows rules (default: the platform's).
 */
export function resolveLibraryLink(link: string, workspaceRoot: string, pathApi: PathApi = path): LibraryLinkTarget {
  const trimmed = link.trim();
  if (trimmed === '') return { kind: 'outside', reason: 'the library entry records an empty path' };
  let candidate = trimmed;
  const scheme = URI_SCHEME.exec(trimmed)?.[1];
  if (scheme !== undefined) {
    if (scheme.toLowerCase() !== 'file') return { kind: 'outside', reason: `${trimmed} is a ${scheme}: link, not a file in the workspace` };
    try {
      candidate = fileURLToPath(trimmed, { windows: pathApi === path.win32 });
    } catch (error) {
      return { kind: 'outside', reason: `${trimmed} is not a usable file URI (${error instanceof Error ? error.message : String(error)})` };
    }
  }
  const root = pathApi.resolve(workspaceRoot);
  const absolutePath = pathApi.resolve(root, candidate);
  const relative = pathApi.relative(root, absolutePath);
  if (relative === '') return { kind: 'outside', reason: `${trimmed} is the workspace folder itself, not a file` };
  if (relative === '..' || relative.startsWith(`..${pathApi.sep}`) || pathApi.isAbsolute(relative)) {
    return { kind: 'outside', reason: `${trimmed} resolves to ${absolutePath}, outside the workspace folder ${root}` };
  }
  return { kind: 'inside', absolutePath };
}
