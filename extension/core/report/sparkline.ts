const BARS = '▁▂▃▄▅▆▇█';

/**
 * A Unicode sparkline of `values` resampled to at most `width` cells (bucket means). Gaps (NaN)
 * show as a space; a constant series shows as a flat line of the lowest bar. Empty input gives ''.
 */
export function renderSparkline(values: ArrayLike<number>, width = 24): string {
  const n = values.length;
  if (n === 0) return '';
  const cells = Math.min(width, n);
  const means: number[] = [];
  for (let c = 0; c < cells; c++) {
    const from = Math.floor((c * n) / cells);
    const to = Math.max(from + 1, Math.floor(((c + 1) * n) / cells));
    let sum = 0;
    let count = 0;
    for (let i = from; i < to; i++) {
      const v = values[i];
      if (Number.isFinite(v)) { sum += v; count++; }
    }
    means.push(count > 0 ? sum / count : NaN);
  }
  const finite = means.filter(Number.isFinite);
  if (finite.length === 0) return ' '.repeat(cells);
  const lo = Math.min(...finite);
  const hi = Math.max(...finite);
  return means.map((m) => {
    if (!Number.isFinite(m)) return ' ';
    if (hi === lo) return BARS[0];
    return BARS[Math.min(BARS.length - 1, Math.floor(((m - lo) / (hi - lo)) * BARS.length))];
  }).join('');
}
