/**
 * Series names as exports flatten them: `name{host="a",mode="user"}`, a packed label column
 * (`{host="a"}` or `host=a,cpu=0`), and unit annotations in headers (`latency (ms)`).
 */

/** Name and labels read from one header or packed cell. */
export interface SeriesName {
  readonly name: string;
  readonly labels: Record<string, string>;
  readonly unit?: string;
}

/**
 * Label set from `{k="v",k2="v2"}` or `k=v,k2=v2` (braces and quotes optional, `\"` and `\\`
 * escapes honoured). Empty values are dropped (OpenMetrics: an empty label value means absent).
 * Returns undefined when the text is not a label set, so callers can keep it as a plain name.
 */
export function parseLabelSet(text: string): Record<string, string> | undefined {
  let s = text.trim();
  if (s.startsWith('{')) {
    if (!s.endsWith('}')) return undefined;
    s = s.slice(1, -1).trim();
  }
  const labels: Record<string, string> = {};
  let pos = 0;
  while (pos < s.length) {
    const keyMatch = /^\s*([A-Za-z_.][\w.\-/]*)\s*=\s*/.exec(s.slice(pos));
    if (keyMatch === null) return undefined;
    pos += keyMatch[0].length;
    let value = '';
    if (s[pos] === '"') {
      pos++;
      while (pos < s.length && s[pos] !== '"') {
        if (s[pos] === '\\' && pos + 1 < s.length) pos++;
        value += s[pos++];
      }
      if (s[pos] !== '"') return undefined;
      pos++;
    } else {
      const end = s.indexOf(',', pos);
      value = (end === -1 ? s.slice(pos) : s.slice(pos, end)).trim();
      pos = end === -1 ? s.length : end;
    }
    if (value !== '') labels[keyMatch[1]] = value;
    const rest = /^\s*,?\s*/.exec(s.slice(pos));
    pos += rest === null ? 0 : rest[0].length;
  }
  return labels;
}

/**
 * Name, labels and unit from a wide-CSV header such as `cpu{host="a"}`, `{__name__="up"}`,
 * `memory used (MB)` or `latency [ms]`. A header that is neither keeps its whole text as name.
 */
export function parseSeriesHeader(header: string): SeriesName {
  const text = header.trim();
  const brace = text.indexOf('{');
  if (brace >= 0 && text.endsWith('}')) {
    const labels = parseLabelSet(text.slice(brace));
    if (labels !== undefined) {
      const name = text.slice(0, brace).trim() || labels['__name__'] || text;
      delete labels['__name__'];
      return { name, labels };
    }
  }
  const unitMatch = /^(.*\S)\s*[([]([^()[\]]{1,12})[)\]]$/.exec(text);
  if (unitMatch !== null) return { name: unitMatch[1], labels: {}, unit: unitMatch[2].trim() };
  return { name: text, labels: {} };
}
