/**
 * Cuts streamed text into lines (`\n` or `\r\n`), calling `onLine(line, lineNumber)` for each.
 * Keeps only the unfinished last line. A line longer than `maxLineChars` is reported once through
 * `onTooLong` and skipped, so input without line breaks cannot grow memory without bound.
 */
export class LineSplitter {
  #pending = '';
  #line = 1;
  #isSkippingLongLine = false;

  constructor(
    readonly onLine: (line: string, lineNumber: number) => void,
    readonly onTooLong: (lineNumber: number) => void,
    readonly maxLineChars = 16 * 1024 * 1024,
  ) {}

  /** Feeds the next chunk. */
  push(chunk: string): void {
    let start = 0;
    let nl = chunk.indexOf('\n');
    while (nl !== -1) {
      if (this.#isSkippingLongLine) {
        this.#isSkippingLongLine = false;
      } else {
        const text = this.#pending.length > 0 ? this.#pending + chunk.slice(start, nl) : chunk.slice(start, nl);
        this.#emit(text);
      }
      this.#pending = '';
      this.#line++;
      start = nl + 1;
      nl = chunk.indexOf('\n', start);
    }
    if (this.#isSkippingLongLine) return;
    this.#pending += chunk.slice(start);
    if (this.#pending.length > this.maxLineChars) {
      this.onTooLong(this.#line);
      this.#pending = '';
      this.#isSkippingLongLine = true;
    }
  }

  /** Emits the last line if it had no line break. */
  finish(): void {
    if (this.#pending.length > 0 && !this.#isSkippingLongLine) this.#emit(this.#pending);
    this.#pending = '';
  }

  /** Current 1-based line number. */
  get line(): number {
    return this.#line;
  }

  #emit(text: string): void {
    const line = text.charCodeAt(text.length - 1) === 13 ? text.slice(0, -1) : text;
    this.onLine(this.#line === 1 && line.charCodeAt(0) === 0xfeff ? line.slice(1) : line, this.#line);
  }
}
