/**
 * `metric-triage library add|list|rm`: manage the team's incident library from a terminal.
 * The library file is the same one the editor uses (.metric-triage/incident-library.json).
 */
import { randomBytes } from 'node:crypto';
import { isAbsolute, resolve } from 'node:path';
import { createLibraryEntry, formatEntryId, type LibraryEntryInput } from '../core/model/libraryEntry';
import { applyLibraryChange } from '../core/model/librarySerialize';
import type { LibraryEntry } from '../core/model/libraryTypes';
import { DEFAULT_LIBRARY_PATH, LibraryFileError, readLibraryFile, updateLibraryFile } from '../node/libraryStore';
import { LIBRARY_USAGE, parseLibraryArgs, type LibraryCommand } from './libraryArgs';
import { prepareEntryFromExport } from './libraryPrepare';

type AddCommand = Extract<LibraryCommand, { kind: 'add' }>;

/** What `library add` needs from the export and the model: everything of an entry except id and time. */
export type PreparedEntry = Omit<LibraryEntryInput, 'id' | 'createdMs' | 'label' | 'postmortem'>;

/** Platform parts of the command; tests pass their own cwd and output. */
export interface LibraryCliDeps {
  readonly cwd: string;
  readonly write: (text: string) => void;
  readonly writeError: (text: string) => void;
  readonly nowMs: () => number;
  /** Reads the export, cuts the windows, embeds them with the bundled model. */
  readonly prepareEntry: (command: AddCommand, cwd: string) => Promise<PreparedEntry>;
}

/**
 * Run `library <sub> …`; returns the process exit code (0 ok, 1 failure, 2 usage error).
 * Never throws: problems are written to stderr with what was expected.
 */
export async function runLibrary(args: string[], deps?: Partial<LibraryCliDeps>): Promise<number> {
  const io: LibraryCliDeps = {
    cwd: process.cwd(),
    write: (t) => { process.stdout.write(t); },
    writeError: (t) => { process.stderr.write(t); },
    nowMs: () => Date.now(),
    prepareEntry: prepareEntryFromExport,
    ...deps,
  };
  const command = parseLibraryArgs(args);
  if ('error' in command) { io.writeError(`${command.error}\n${LIBRARY_USAGE}\n`); return 2; }
  if (command.kind === 'help') { io.write(`${LIBRARY_USAGE}\n`); return 0; }
  const file = resolveLibraryPath(io.cwd, command.library);
  try {
    switch (command.kind) {
      case 'list': return await listEntries(file, command.isJson, io);
      case 'rm': return await removeEntries(file, command.ids, io);
      case 'add': return await addEntry(file, command, io);
      default: return assertNever(command);
    }
  } catch (error) {
    io.writeError(`${error instanceof LibraryFileError ? error.message : `library ${command.kind}: ${error instanceof Error ? error.message : String(error)}`}\n`);
    return 1;
  }
}

/** Absolute library path: `--library` relative to cwd, or the default workspace location. */
export function resolveLibraryPath(cwd: string, library: string | undefined): string {
  const path = library ?? DEFAULT_LIBRARY_PATH;
  return isAbsolute(path) ? path : resolve(cwd, path);
}

/** New entry id: UTC creation time (so ids sort by age) and 6 random hex digits. */
export function createEntryId(nowMs: number): string {
  return formatEntryId(nowMs, randomBytes(3).toString('hex'));
}

async function listEntries(file: string, isJson: boolean, io: LibraryCliDeps): Promise<number> {
  const { entries } = await readLibraryFile(file);
  if (isJson) {
    io.write(`${JSON.stringify(entries.map(summarizeEntry), null, 2)}\n`);
    return 0;
  }
  if (entries.length === 0) { io.write(`no entries in ${file}\n`); return 0; }
  const counts = new Map<string, number>();
  for (const e of entries) counts.set(e.label, (counts.get(e.label) ?? 0) + 1);
  io.write(`${entries.length} entries, ${counts.size} labels in ${file}\n`);
  for (const e of entries) {
    const s = summarizeEntry(e);
    io.write(`${s.id}  ${s.label}${e.isBuiltInClass ? '' : ' (own label)'}  ${s.window}  ${s.exportFile}  model ${s.modelVersion}${s.postmortem ? `  ${s.postmortem}` : ''}\n`);
  }
  return 0;
}

function summarizeEntry(e: LibraryEntry): { id: string; label: string; window: string; exportFile: string; modelVersion: string; metricCount: number; postmortem?: string } {
  return {
    id: e.id, label: e.label, window: `${new Date(e.window.startMs).toISOString()}/${new Date(e.window.endMs).toISOString()}`,
    exportFile: e.exportFile, modelVersion: e.modelVersion, metricCount: e.metrics.length, ...(e.postmortem ? { postmortem: e.postmortem } : {}),
  };
}

async function removeEntries(file: string, ids: readonly string[], io: LibraryCliDeps): Promise<number> {
  let missing: string[] = [];
  await updateLibraryFile(file, (doc) => {
    const known = new Set(doc.entries.map((e) => e.id));
    missing = ids.filter((id) => !known.has(id));
    return applyLibraryChange(doc, { removeIds: ids });
  });
  const removed = ids.length - missing.length;
  io.write(`removed ${removed} ${removed === 1 ? 'entry' : 'entries'} from ${file}\n`);
  if (missing.length > 0) { io.writeError(`library rm: expected ids listed by \`library list\`, not found: ${missing.join(', ')}\n`); return 1; }
  return 0;
}

async function addEntry(file: string, command: AddCommand, io: LibraryCliDeps): Promise<number> {
  // Validate the library before the (slower) model run, so a broken file is reported first.
  await readLibraryFile(file);
  const prepared = await io.prepareEntry(command, io.cwd);
  const nowMs = io.nowMs();
  const entry = createLibraryEntry({
    ...prepared, id: createEntryId(nowMs), createdMs: nowMs, label: command.label,
    ...(command.postmortem !== undefined ? { postmortem: command.postmortem } : {}),
  });
  await updateLibraryFile(file, (doc) => applyLibraryChange(doc, { upsert: [entry] }));
  io.write(`added ${entry.id} (${entry.label}, ${entry.metrics.length} metrics, model ${entry.modelVersion}) to ${file}\n`);
  return 0;
}

function assertNever(value: never): never {
  throw new Error(`unexpected command ${JSON.stringify(value)}`);
}
