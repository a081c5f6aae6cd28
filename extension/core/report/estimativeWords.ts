/**
 * Words of estimative probability (Sherman Kent, "Words of Estimative Probability", Studies in
 * Intelligence, 1964): each word with the centre of its published band. Impossible (0) and
 * certain (1) are left out on purpose: a classifier's probability never justifies them.
 */
export const ESTIMATIVE_WORDS: ReadonlyArray<{ readonly word: string; readonly centre: number; readonly spread: number }> = [
  { word: 'almost certain', centre: 0.93, spread: 0.06 },
  { word: 'probable', centre: 0.75, spread: 0.12 },
  { word: 'chances about even', centre: 0.5, spread: 0.1 },
  { word: 'probably not', centre: 0.3, spread: 0.1 },
  { word: 'almost certainly not', centre: 0.07, spread: 0.05 },
];

/**
 * The estimative word whose band centre is nearest to `probability` (0..1). Between bands the
 * nearer centre wins; ties go to the less confident word. NaN gives 'chances about even'.
 */
export function describeProbability(probability: number): string {
  if (!Number.isFinite(probability)) return 'chances about even';
  let best = ESTIMATIVE_WORDS[2];
  let bestDistance = Infinity;
  for (const entry of ESTIMATIVE_WORDS) {
    const distance = Math.abs(entry.centre - probability);
    if (distance < bestDistance || (distance === bestDistance && entry.centre < best.centre)) {
      best = entry;
      bestDistance = distance;
    }
  }
  return best.word;
}
