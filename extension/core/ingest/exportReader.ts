import type { IngestResult } from './types';

/**
 * A streaming reader for one export: feed text chunks in order with `push`, then call `finish`
 * once. Readers never throw on bad data; problems come back as issues in the result.
 */
export interface ExportReader {
  push(chunk: string): void;
  finish(): IngestResult;
}

/** Keeps text until the first complete line is known (some readers decide their dialect on it). */
export class FirstLineBuffer {
  #text = '';

  /** Adds a chunk; returns the buffered text once it contains a non-empty line, else undefined. */
  push(chunk: string): string | undefined {
    this.#text += chunk;
    const firstLine = findFirstLine(this.#text, false);
    if (firstLine === undefined) return undefined;
    const text = this.#text;
    this.#text = '';
    return text;
  }

  /** Whatever was buffered (end of input reached before a full line). */
  flush(): string {
    const text = this.#text;
    this.#text = '';
    return text;
  }
}

/**
 * First non-blank line of `text` (BOM removed). With `isComplete` false, a line that is not yet
 * terminated does not count. Returns undefined when there is none.
 */
export function findFirstLine(text: string, isComplete: boolean): string | undefined {
  let start = text.charCodeAt(0) === 0xfeff ? 1 : 0;
  while (start < text.length) {
    const nl = text.indexOf('\n', start);
    if (nl === -1) {
      const rest = text.slice(start).trim();
      return isComplete && rest !== '' ? rest : undefined;
    }
    const line = text.slice(start, nl).trim();
    if (line !== '') return line;
    start = nl + 1;
  }
  return undefined;
}
