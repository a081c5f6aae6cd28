/**
 * The incident-library file on disk: one versioned JSON file in the workspace, committed with the
 * postmortems. Reads validate; a file that does not validate is never written over. Writes are
 * atomic (temp file + rename) and serialized by a lock file, and every change is re-applied to the
 * file's current content under the lock, so two saves started at once keep both entries.
 */
import { randomBytes } from 'node:crypto';
import { promises as fs } from 'node:fs';
import { dirname, join, basename } from 'node:path';
import { createEmptyLibrary, parseLibraryText } from '../core/model/libraryDocument';
import { serializeLibrary } from '../core/model/librarySerialize';
import type { LibraryDocument, LibraryIssue } from '../core/model/libraryTypes';

/** Workspace-relative default location of the library file. */
export const DEFAULT_LIBRARY_PATH = '.metric-triage/incident-library.json';

/** A library file that cannot be used as it is; it is left untouched until someone fixes it. */
export class LibraryFileError extends Error {
  constructor(readonly file: string, readonly issues: readonly LibraryIssue[]) {
    super(formatLibraryIssues(file, issues));
    this.name = 'LibraryFileError';
  }
}

/** Human-readable issue list: `file: $.entries[2].label: expected …`, one per line (at most 20). */
export function formatLibraryIssues(file: string, issues: readonly LibraryIssue[]): string {
  const shown = issues.slice(0, 20).map((i) => `${i.file}: ${i.path}: ${i.message}`);
  if (issues.length > 20) shown.push(`… and ${issues.length - 20} more issues`);
  return `incident library ${file} cannot be used and will not be overwritten until it is fixed:\n${shown.join('\n')}`;
}

/**
 * The library in `file`. A missing file is an empty library; an empty (0-byte) file counts as
 * truncated. Throws LibraryFileError for unreadable, invalid, truncated or newer-version files.
 */
export async function readLibraryFile(file: string): Promise<LibraryDocument> {
  let text: string;
  try {
    text = await fs.readFile(file, 'utf8');
  } catch (error) {
    if (isErrnoCode(error, 'ENOENT')) return createEmptyLibrary();
    throw new LibraryFileError(file, [{ file, path: '$', message: `expected a readable file, got ${describeError(error)}` }]);
  }
  if (text.trim().length === 0) {
    throw new LibraryFileError(file, [{ file, path: 'line 1, column 1', message: 'expected a JSON library document, got an empty file (truncated?)' }]);
  }
  const parsed = parseLibraryText(text.replace(/^\uFEFF/, ''), file);
  if (parsed.document === undefined) throw new LibraryFileError(file, parsed.issues);
  return parsed.document;
}

/** Lock tuning; the defaults suit a person clicking commands and a CLI run side by side. */
export interface LibraryLockOptions {
  /** Give up waiting for the lock after this long (ms). */
  readonly timeoutMs?: number;
  /** A lock older than this (ms) is considered left behind by a crashed process and broken. */
  readonly staleMs?: number;
}

/**
 * Apply `change` to the library in `file` and save it: under the lock, the file is re-read (so
 * changes made meanwhile by others are kept), `change` maps it to the new document, and the result
 * is written atomically. Returns the saved document. Throws LibraryFileError (nothing written) when
 * the current file does not validate, and an Error naming the lock file when the lock cannot be
 * taken within timeoutMs.
 */
export async function updateLibraryFile(
  file: string,
  change: (current: LibraryDocument) => LibraryDocument | Promise<LibraryDocument>,
  options: LibraryLockOptions = {},
): Promise<LibraryDocument> {
  await fs.mkdir(dirname(file), { recursive: true });
  const release = await acquireLock(`${file}.lock`, options.timeoutMs ?? 10_000, options.staleMs ?? 30_000);
  try {
    const current = await readLibraryFile(file);
    const next = await change(current);
    await writeFileAtomically(file, serializeLibrary(next));
    return next;
  } finally {
    await release();
  }
}

/** Write `text` to a temp file beside `file`, flush it, then rename over `file` (atomic on POSIX and NTFS). */
export async function writeFileAtomically(file: string, text: string): Promise<void> {
  const temp = join(dirname(file), `.${basename(file)}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`);
  const handle = await fs.open(temp, 'wx');
  try {
    await handle.writeFile(text, 'utf8');
    await handle.sync();
  } finally {
    await handle.close();
  }
  try {
    await fs.rename(temp, file);
  } catch (error) {
    await fs.rm(temp, { force: true });
    throw error;
  }
}

async function acquireLock(lockFile: string, timeoutMs: number, staleMs: number): Promise<() => Promise<void>> {
  const startedMs = Date.now();
  const token = `${process.pid} ${randomBytes(6).toString('hex')} ${new Date().toISOString()}\n`;
  for (let attempt = 0; ; attempt++) {
    try {
      await fs.writeFile(lockFile, token, { flag: 'wx' });
      return async () => { await releaseLock(lockFile, token); };
    } catch (error) {
      if (!isErrnoCode(error, 'EEXIST')) throw error;
    }
    await breakStaleLock(lockFile, staleMs);
    if (Date.now() - startedMs > timeoutMs) {
      throw new Error(`expected to lock the incident library within ${timeoutMs} ms, but ${lockFile} is still held; delete it if no Metric Triage is saving`);
    }
    // Jittered, growing wait so two waiters do not retry in lockstep.
    await delay(Math.min(200, 10 * (attempt + 1)) * (0.5 + Math.random()));
  }
}

async function releaseLock(lockFile: string, token: string): Promise<void> {
  try {
    // Only remove the lock we hold: after a stale-lock break another process may own it now.
    if ((await fs.readFile(lockFile, 'utf8')) === token) await fs.rm(lockFile, { force: true });
  } catch (error) {
    if (!isErrnoCode(error, 'ENOENT')) throw error;
  }
}

async function breakStaleLock(lockFile: string, staleMs: number): Promise<void> {
  try {
    const stat = await fs.stat(lockFile);
    if (Date.now() - stat.mtimeMs > staleMs) await fs.rm(lockFile, { force: true });
  } catch (error) {
    if (!isErrnoCode(error, 'ENOENT')) throw error;
  }
}

function delay(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

function isErrnoCode(error: unknown, code: string): boolean {
  return typeof error === 'object' && error !== null && (error as { code?: unknown }).code === code;
}

function describeError(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}
