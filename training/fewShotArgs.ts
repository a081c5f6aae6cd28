/**
 * What the few-shot evaluation reads before it starts: its command-line options, and the bundled
 * model's training seed and train-system count (so its systems are disjoint from the model's).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { DEFAULT_TRAIN_SYSTEMS } from './simulator';

/** `--seed N --episodes N --model DIR --f1-budget POINTS`. */
export function parseFewShotArgs(argv: readonly string[]): { seed?: number; episodes: number; modelDir: string; budget: number } {
  const get = (name: string): string | undefined => {
    const i = argv.indexOf(`--${name}`);
    return i >= 0 ? argv[i + 1] : undefined;
  };
  const seed = get('seed');
  return { ...(seed !== undefined ? { seed: Number(seed) } : {}), episodes: Number(get('episodes') ?? '10'), modelDir: get('model') ?? 'media/model', budget: Number(get('f1-budget') ?? '1') };
}

/** The seed the bundled model was trained with (its splits' systems are then disjoint from ours). */
export function readTrainingSeed(modelDir: string): number {
  const json = JSON.parse(readFileSync(join(modelDir, 'classifier.json'), 'utf8')) as { training?: { seed?: unknown } };
  const seed = json.training?.seed;
  if (typeof seed !== 'number') throw new Error(`${modelDir}/classifier.json: expected training.seed as a number (pass --seed), got ${JSON.stringify(seed)}`);
  return seed;
}

/** How many systems the bundled model's train split used (their seeds are reserved here too). */
export function readTrainSystems(modelDir: string): number {
  const json = JSON.parse(readFileSync(join(modelDir, 'classifier.json'), 'utf8')) as { training?: { trainSystems?: unknown } };
  const count = json.training?.trainSystems;
  return typeof count === 'number' && Number.isInteger(count) && count > 0 ? count : DEFAULT_TRAIN_SYSTEMS;
}
