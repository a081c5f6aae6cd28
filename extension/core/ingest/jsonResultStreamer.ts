/**
 * Streams a range-query JSON document without holding it: each object element of `data.result`
 * is cut out and handed over as text as soon as it closes; everything else (status, error,
 * warnings, resultType — in any key order) is kept as a small "envelope" document in which
 * `result` is left as an empty array. Memory ≈ one series element plus the envelope.
 */
export class JsonResultStreamer {
  #envelope: string[] = [];
  /** Text already scanned but not yet settled (an open element or key). */
  #carried = '';
  #isDroppingComma = false;
  /** Container stack: for objects, the current key; for arrays, null. */
  #keys: Array<string | null> = [];
  #isObject: boolean[] = [];
  #isExpectingKey = false;
  #isInString = false;
  #isEscaped = false;
  #stringStart = -1;
  #elementStart = -1;
  #elementLine = 1;
  #line = 1;
  #elementCount = 0;

  constructor(readonly onElement: (text: string, index: number, line: number) => void) {}

  /** Feeds the next chunk. */
  push(chunk: string): void {
    const text = this.#carried + chunk;
    let i = this.#carried.length;
    this.#carried = '';
    let copyFrom = 0;
    for (; i < text.length; i++) {
      const c = text.charCodeAt(i);
      if (c === 10) this.#line++;
      if (this.#isInString) {
        if (this.#isEscaped) this.#isEscaped = false;
        else if (c === 92) this.#isEscaped = true;
        else if (c === 34) {
          this.#isInString = false;
          if (this.#stringStart >= 0) { this.#keys[this.#keys.length - 1] = text.slice(this.#stringStart, i); this.#stringStart = -1; }
        }
        continue;
      }
      if (c === 34) {
        this.#isInString = true;
        if (this.#isExpectingKey && this.#isObject[this.#isObject.length - 1] === true) this.#stringStart = i + 1;
      } else if (c === 123 || c === 91) {
        if (c === 123 && this.#elementStart < 0 && this.#isAtResultArray()) {
          this.#envelope.push(text.slice(copyFrom, i));
          this.#elementStart = i;
          this.#elementLine = this.#line;
        }
        this.#keys.push(null);
        this.#isObject.push(c === 123);
        this.#isExpectingKey = c === 123;
      } else if (c === 125 || c === 93) {
        this.#keys.pop();
        this.#isObject.pop();
        this.#isExpectingKey = false;
        if (this.#elementStart >= 0 && this.#isAtResultArray()) {
          const element = text.slice(this.#elementStart, i + 1);
          this.onElement(element, this.#elementCount++, this.#elementLine);
          // Keep the element's line breaks so line numbers in the envelope match the file.
          const breaks = this.#line - this.#elementLine;
          if (breaks > 0) this.#envelope.push('\n'.repeat(breaks));
          this.#elementStart = -1;
          copyFrom = i + 1;
          this.#isDroppingComma = true;
        }
      } else if (c === 44) {
        this.#isExpectingKey = this.#isObject[this.#isObject.length - 1] === true;
        // The comma after a streamed element is dropped so the envelope stays valid JSON.
        if (this.#isDroppingComma && this.#elementStart < 0) { this.#envelope.push(text.slice(copyFrom, i)); copyFrom = i + 1; }
        this.#isDroppingComma = false;
      } else if (c === 58) {
        this.#isExpectingKey = false;
      }
      // Only a comma directly after a streamed element (whitespace aside) is dropped.
      if (c > 32 && c !== 44 && copyFrom !== i + 1) this.#isDroppingComma = false;
    }
    // Carry over an open element, or an open key (keys are read whole), to the next chunk.
    const carryFrom = this.#elementStart >= 0 ? this.#elementStart : this.#stringStart >= 0 ? this.#stringStart : -1;
    if (carryFrom < 0) { this.#envelope.push(text.slice(copyFrom)); return; }
    if (this.#elementStart < 0) this.#envelope.push(text.slice(copyFrom, carryFrom));
    this.#carried = text.slice(carryFrom);
    if (this.#elementStart >= 0) this.#elementStart = 0;
    if (this.#stringStart >= 0) this.#stringStart = this.#stringStart - carryFrom;
  }

  /** The envelope (the document without the streamed elements) and the text of an unfinished element, if any. */
  finish(): { envelope: string; unfinishedElement: string } {
    if (this.#elementStart >= 0) return { envelope: this.#envelope.join(''), unfinishedElement: this.#carried };
    return { envelope: this.#envelope.join('') + this.#carried, unfinishedElement: '' };
  }

  /** Number of elements handed over so far. */
  get elementCount(): number {
    return this.#elementCount;
  }

  /** True when the innermost open container is the array at `data.result`. */
  #isAtResultArray(): boolean {
    const k = this.#keys;
    return k.length === 3 && !this.#isObject[2] && this.#isObject[0] && this.#isObject[1] && k[0] === 'data' && k[1] === 'result';
  }
}
