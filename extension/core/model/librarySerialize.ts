import { LIBRARY_SCHEMA_VERSION, type LibraryDocument, type LibraryEntry, type LibraryMetric } from './libraryTypes';
import { sortEntries } from './libraryDocument';

/**
 * Text of a library file: entries sorted by id, keys in a fixed order, one line per scalar field
 * and one line per metric, so two people adding entries on two branches touch different lines
 * and git merges them without conflict. Ends with a newline. Throws only on programmer error
 * (a non-finite number, which parseLibraryText would refuse to read back).
 */
export function serializeLibrary(document: LibraryDocument): string {
  const entries = sortEntries(document.entries);
  const lines: string[] = ['{', `  "schemaVersion": ${LIBRARY_SCHEMA_VERSION},`];
  if (entries.length === 0) {
    lines.push('  "entries": []', '}');
    return `${lines.join('\n')}\n`;
  }
  lines.push('  "entries": [');
  entries.forEach((entry, index) => {
    const block = serializeEntry(entry);
    lines.push(...block.slice(0, -1), block[block.length - 1] + (index < entries.length - 1 ? ',' : ''));
  });
  lines.push('  ]', '}');
  return `${lines.join('\n')}\n`;
}

function serializeEntry(entry: LibraryEntry): string[] {
  const fields: [string, string][] = [
    ['id', json(entry.id)],
    ['label', json(entry.label)],
    ['isBuiltInClass', json(entry.isBuiltInClass)],
    ['window', `{"startMs": ${num(entry.window.startMs)}, "endMs": ${num(entry.window.endMs)}}`],
    ['baseline', `{"startMs": ${num(entry.baseline.startMs)}, "endMs": ${num(entry.baseline.endMs)}}`],
    ['exportSha256', json(entry.exportSha256)],
    ['exportFile', json(entry.exportFile)],
  ];
  if (entry.postmortem !== undefined) fields.push(['postmortem', json(entry.postmortem)]);
  fields.push(
    ['createdMs', num(entry.createdMs)],
    ['modelVersion', json(entry.modelVersion)],
    ['embedding', `[${entry.embedding.map(num).join(', ')}]`],
  );
  const lines = ['    {'];
  for (const [key, value] of fields) lines.push(`      ${json(key)}: ${value},`);
  lines.push('      "metrics": [');
  entry.metrics.forEach((metric, index) => {
    lines.push(`        ${serializeMetric(metric)}${index < entry.metrics.length - 1 ? ',' : ''}`);
  });
  lines.push('      ]', '    }');
  return lines;
}

function serializeMetric(metric: LibraryMetric): string {
  const points = (values: readonly (number | null)[]): string => {
    for (const v of values) if (v !== null && !Number.isFinite(v)) throw new Error(`expected finite numbers or null in metric ${metric.id}, got ${v}`);
    // Native stringify is several times faster than per-number joins; numbers never contain commas.
    return JSON.stringify(values).replaceAll(',', ', ');
  };
  return `{"id": ${json(metric.id)}, "name": ${json(metric.name)}, "family": ${json(metric.family)}, "baseline": ${points(metric.baseline)}, "window": ${points(metric.window)}}`;
}

function json(value: string | boolean): string {
  return JSON.stringify(value);
}

function num(value: number): string {
  if (!Number.isFinite(value)) throw new Error(`expected a finite number in the library, got ${value}`);
  // String() prints finite numbers exactly as JSON.stringify does, several times faster.
  return String(value);
}

/** A change to apply to the library under the store's lock (so concurrent changes all survive). */
export interface LibraryChange {
  /** Entries to add, or to replace when their id already exists. */
  readonly upsert?: readonly LibraryEntry[];
  /** Ids to remove; unknown ids are ignored (someone else may have removed them already). */
  readonly removeIds?: readonly string[];
  /** New labels by entry id (the caller derives isBuiltInClass from the new label). */
  readonly relabel?: readonly { readonly id: string; readonly label: string; readonly isBuiltInClass: boolean }[];
}

/**
 * The library after a change: removals first, then relabels, then upserts; the result is sorted
 * by id. Pure: the input document is not modified. Relabels of unknown ids are ignored.
 */
export function applyLibraryChange(document: LibraryDocument, change: LibraryChange): LibraryDocument {
  const byId = new Map(document.entries.map((e) => [e.id, e] as const));
  for (const id of change.removeIds ?? []) byId.delete(id);
  for (const r of change.relabel ?? []) {
    const entry = byId.get(r.id);
    if (entry !== undefined) byId.set(r.id, { ...entry, label: r.label, isBuiltInClass: r.isBuiltInClass });
  }
  for (const entry of change.upsert ?? []) byId.set(entry.id, entry);
  return { schemaVersion: LIBRARY_SCHEMA_VERSION, entries: sortEntries([...byId.values()]) };
}
