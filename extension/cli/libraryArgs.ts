/**
 * Argument parsing for `metric-triage library …` (kept apart from the command so it is testable
 * without files or a model).
 */
import type { LibraryTimeSpan } from '../core/model/libraryTypes';
import { checkLibraryLabel } from '../core/model/libraryDocument';

export type LibraryCommand =
  | { readonly kind: 'add'; readonly exportFile: string; readonly label: string; readonly window: LibraryTimeSpan; readonly baseline?: LibraryTimeSpan; readonly library?: string; readonly postmortem?: string; readonly modelDir?: string }
  | { readonly kind: 'list'; readonly library?: string; readonly isJson: boolean }
  | { readonly kind: 'rm'; readonly ids: readonly string[]; readonly library?: string }
  | { readonly kind: 'help' };

export const LIBRARY_USAGE = [
  'usage: metric-triage library add FILE --label LABEL --window START/END [--baseline START/END] [--postmortem PATH] [--library PATH] [--model DIR]',
  '       metric-triage library list [--json] [--library PATH]',
  '       metric-triage library rm ID... [--library PATH]',
  'times: RFC 3339 with a zone (2026-11-04T14:03:00Z) or epoch milliseconds; both ends inclusive.',
  'default library: .metric-triage/incident-library.json in the current folder.',
].join('\n');

const FLAGS: Readonly<Record<string, readonly string[]>> = {
  add: ['--label', '--window', '--baseline', '--library', '--postmortem', '--model'],
  list: ['--library'],
  rm: ['--library'],
};

/** Parsed command, or an error message that names the argument and what was expected. */
export function parseLibraryArgs(args: readonly string[]): LibraryCommand | { readonly error: string } {
  const [sub, ...rest] = args;
  if (sub === undefined || sub === 'help' || sub === '--help' || sub === '-h') return { kind: 'help' };
  const allowed = FLAGS[sub];
  if (allowed === undefined) return { error: `expected a subcommand add, list or rm, got ${JSON.stringify(sub)}` };
  const flags = new Map<string, string>();
  const positional: string[] = [];
  let isJson = false;
  for (let i = 0; i < rest.length; i++) {
    const arg = rest[i];
    if (sub === 'list' && arg === '--json') { isJson = true; continue; }
    if (!arg.startsWith('--')) { positional.push(arg); continue; }
    const [name, inline] = arg.includes('=') ? [arg.slice(0, arg.indexOf('=')), arg.slice(arg.indexOf('=') + 1)] : [arg, undefined];
    if (!allowed.includes(name)) return { error: `library ${sub}: unknown option ${name}; expected one of ${[...allowed, ...(sub === 'list' ? ['--json'] : [])].join(', ')}` };
    const value = inline ?? rest[++i];
    if (value === undefined || value.length === 0) return { error: `library ${sub}: expected a value after ${name}` };
    if (flags.has(name)) return { error: `library ${sub}: ${name} given twice` };
    flags.set(name, value);
  }
  const library = flags.get('--library');
  const withLibrary = library !== undefined ? { library } : {};
  if (sub === 'list') return positional.length > 0 ? { error: `library list: expected no file or id, got ${positional.join(' ')}` } : { kind: 'list', isJson, ...withLibrary };
  if (sub === 'rm') return positional.length === 0 ? { error: 'library rm: expected at least one entry ID (see library list)' } : { kind: 'rm', ids: positional, ...withLibrary };
  return parseAdd(positional, flags, withLibrary);
}

function parseAdd(positional: readonly string[], flags: ReadonlyMap<string, string>, withLibrary: { library?: string }): LibraryCommand | { error: string } {
  if (positional.length !== 1) return { error: `library add: expected exactly one export FILE, got ${positional.length}` };
  const label = flags.get('--label');
  if (label === undefined) return { error: 'library add: expected --label LABEL (a built-in class or your own name, e.g. connection_pool_exhaustion)' };
  const labelError = checkLibraryLabel(label);
  if (labelError !== undefined) return { error: `library add: --label: ${labelError}` };
  const windowText = flags.get('--window');
  if (windowText === undefined) return { error: 'library add: expected --window START/END' };
  const window = parseTimeSpan(windowText);
  if ('error' in window) return { error: `library add: --window: ${window.error}` };
  const baselineText = flags.get('--baseline');
  const baseline = baselineText === undefined ? undefined : parseTimeSpan(baselineText);
  if (baseline !== undefined && 'error' in baseline) return { error: `library add: --baseline: ${baseline.error}` };
  const postmortem = flags.get('--postmortem');
  const modelDir = flags.get('--model');
  return {
    ...(modelDir !== undefined ? { modelDir } : {}),
    kind: 'add', exportFile: positional[0], label, window, ...(baseline !== undefined ? { baseline } : {}),
    ...withLibrary, ...(postmortem !== undefined ? { postmortem } : {}),
  };
}

const RFC3339 = /^\d{4}-\d{2}-\d{2}[Tt ]\d{2}:\d{2}:\d{2}(\.\d+)?([Zz]|[+-]\d{2}:\d{2})$/;

/** `START/END` (ISO 8601 interval style) → epoch ms span; each end RFC 3339 with a zone, or integer epoch ms. */
export function parseTimeSpan(text: string): LibraryTimeSpan | { error: string } {
  const parts = text.split('/');
  if (parts.length !== 2) return { error: `expected START/END, got ${JSON.stringify(text)}` };
  const [startMs, endMs] = parts.map(parseTime);
  if (startMs === undefined || endMs === undefined) {
    return { error: `expected RFC 3339 times with a zone (2026-11-04T14:03:00Z) or epoch milliseconds, got ${JSON.stringify(text)}` };
  }
  if (endMs < startMs) return { error: `expected END at or after START, got ${new Date(startMs).toISOString()}/${new Date(endMs).toISOString()}` };
  return { startMs, endMs };
}

function parseTime(text: string): number | undefined {
  if (/^\d{1,15}$/.test(text)) return Number(text);
  if (!RFC3339.test(text)) return undefined;
  const ms = Date.parse(text.replace(' ', 'T'));
  return Number.isFinite(ms) ? ms : undefined;
}
