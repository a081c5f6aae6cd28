/** Receives one complete top-level JSON text and the 1-based line it starts on. */
export type JsonValueHandler = (text: string, line: number) => void;

/**
 * Cuts a stream of text into top-level JSON values by tracking brace/bracket depth outside
 * strings. Handles JSON Lines (one value per line) as well as pretty-printed or concatenated
 * documents. Text outside any value that is not whitespace is reported through `onJunk`.
 * Keeps only the unfinished value in memory. Values longer than `maxValueChars` are dropped and
 * reported, so a missing closing brace cannot make memory grow without bound.
 */
export class JsonValueSplitter {
  #buffer = '';
  #scanFrom = 0;
  #valueStart = -1;
  #depth = 0;
  #isInString = false;
  #isEscaped = false;
  #line = 1;
  #valueLine = 1;

  constructor(
    readonly onValue: JsonValueHandler,
    readonly onJunk: (text: string, line: number) => void,
    readonly maxValueChars = 256 * 1024 * 1024,
  ) {}

  /** Feeds the next chunk. */
  push(chunk: string): void {
    this.#buffer += chunk;
    this.#scan();
    if (this.#valueStart < 0) { this.#buffer = ''; this.#scanFrom = 0; return; }
    if (this.#buffer.length - this.#valueStart > this.maxValueChars) {
      this.onJunk(`a JSON value longer than ${this.maxValueChars} characters`, this.#valueLine);
      this.#reset();
      return;
    }
    this.#buffer = this.#buffer.slice(this.#valueStart);
    this.#scanFrom -= this.#valueStart;
    this.#valueStart = 0;
  }

  /** Ends the stream; an unfinished value is reported as junk (truncated input). */
  finish(): void {
    if (this.#valueStart >= 0) this.onJunk(`an unfinished JSON value (input ends inside it)`, this.#valueLine);
    this.#reset();
  }

  /** Current 1-based line (after the text fed so far). */
  get line(): number {
    return this.#line;
  }

  #reset(): void {
    this.#buffer = '';
    this.#scanFrom = 0;
    this.#valueStart = -1;
    this.#depth = 0;
    this.#isInString = false;
    this.#isEscaped = false;
  }

  #scan(): void {
    const b = this.#buffer;
    let junkStart = -1;
    for (let i = this.#scanFrom; i < b.length; i++) {
      const c = b.charCodeAt(i);
      if (c === 10) this.#line++;
      if (this.#isInString) {
        if (this.#isEscaped) this.#isEscaped = false;
        else if (c === 92) this.#isEscaped = true;
        else if (c === 34) this.#isInString = false;
        continue;
      }
      if (c === 34) {
        if (this.#depth === 0 && junkStart < 0) junkStart = i;
        this.#isInString = true;
        continue;
      }
      if (c === 123 || c === 91) {
        if (this.#depth === 0) {
          if (junkStart >= 0) { this.onJunk(b.slice(junkStart, i).trim(), this.#line); junkStart = -1; }
          this.#valueStart = i;
          this.#valueLine = this.#line;
        }
        this.#depth++;
      } else if (c === 125 || c === 93) {
        if (this.#depth === 0) { if (junkStart < 0) junkStart = i; continue; }
        this.#depth--;
        if (this.#depth === 0) {
          this.onValue(b.slice(this.#valueStart, i + 1), this.#valueLine);
          this.#valueStart = -1;
        }
      } else if (this.#depth === 0 && c > 32 && c !== 0xfeff && junkStart < 0) {
        junkStart = i;
      } else if (this.#depth === 0 && c === 10 && junkStart >= 0) {
        this.onJunk(b.slice(junkStart, i).trim(), this.#line - 1);
        junkStart = -1;
      }
    }
    if (junkStart >= 0) this.onJunk(b.slice(junkStart).trim(), this.#line);
    this.#scanFrom = b.length;
  }
}
