import { CsvRowSplitter, detectDelimiter, type CsvPlainLineHandler, type CsvRowHandler } from './csvRowSplitter';
import { FirstLineBuffer, findFirstLine } from './exportReader';
import { ValueCellReader } from './valueCells';

/**
 * The chunk-feeding half shared by the wide and long CSV readers: text is buffered until the first
 * line shows the delimiter (`,`, `;` or tab); then a row splitter takes over, and `;` switches the
 * value cells to decimal commas (the European spreadsheet dialect).
 */
export class CsvFeed {
  readonly #firstLine = new FirstLineBuffer();
  #splitter: CsvRowSplitter | undefined;
  #delimiter = ',';
  #cells = new ValueCellReader(false);

  constructor(readonly onRow: CsvRowHandler, readonly onPlainLine: CsvPlainLineHandler) {}

  /** The delimiter found on the first line (',' until then). */
  get delimiter(): string {
    return this.#delimiter;
  }

  /** Value-cell reader for the dialect found on the first line. */
  get cells(): ValueCellReader {
    return this.#cells;
  }

  push(chunk: string): void {
    if (this.#splitter !== undefined) { this.#splitter.push(chunk); return; }
    const text = this.#firstLine.push(chunk);
    if (text !== undefined) this.#start(text);
  }

  /** Flushes buffered text; returns the number of the line after the last one read (1 if none). */
  finish(): number {
    if (this.#splitter === undefined) {
      const rest = this.#firstLine.flush();
      if (rest.trim() !== '') this.#start(rest);
    }
    this.#splitter?.finish();
    return this.#splitter?.nextLine ?? 1;
  }

  #start(text: string): void {
    const delimiter = detectDelimiter(findFirstLine(text, true) ?? '');
    this.#cells = new ValueCellReader(delimiter === ';');
    this.#delimiter = delimiter;
    this.#splitter = new CsvRowSplitter(delimiter, this.onRow, this.onPlainLine);
    this.#splitter.push(text);
  }
}
