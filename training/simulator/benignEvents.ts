/**
 * Harmless things that happen in quiet periods: deploy blips, cron spikes, GC pauses, short
 * traffic bursts and permanent level shifts. Without them a model learns "anything moved = fault".
 */
import type { Drivers } from './latentModel';
import type { Random } from './random';

export const BENIGN_KINDS = ['deploy', 'cron', 'latencyBurst', 'trafficBurst', 'levelShift', 'latencyDrift'] as const;
export type BenignKind = (typeof BENIGN_KINDS)[number];

/** Applies one benign event starting at grid index `at` (clipped to the grid). */
export function applyBenignEvent(d: Drivers, kind: BenignKind, at: number, rng: Random): void {
  const n = d.trafficScale.length;
  if (at < 0 || at >= n) return;
  const span = (lo: number, hi: number): [number, number] => [at, Math.min(n - 1, at + rng.int(lo, hi) - 1)];
  switch (kind) {
    case 'deploy': {
      d.restart[at] = 1;
      const [a, b] = span(1, 3);
      for (let i = a; i <= b; i += 1) {
        d.cpuExtra[i] = (d.cpuExtra[i] as number) + rng.uniform(0.05, 0.3);
        d.tailExtra[i] = (d.tailExtra[i] as number) + rng.uniform(0, 2);
      }
      return;
    }
    case 'cron': {
      const [a, b] = span(1, 5);
      const cpu = rng.uniform(0.05, 0.35);
      const disk = rng.chance(0.5) ? rng.uniform(0.05, 0.4) : 0;
      for (let i = a; i <= b; i += 1) {
        d.cpuExtra[i] = (d.cpuExtra[i] as number) + cpu;
        d.diskExtra[i] = (d.diskExtra[i] as number) + disk;
      }
      return;
    }
    case 'latencyBurst': {
      const [a, b] = span(1, 8);
      const factor = rng.uniform(1.2, 3);
      for (let i = a; i <= b; i += 1) {
        d.latencyScale[i] = (d.latencyScale[i] as number) * factor;
        d.tailExtra[i] = (d.tailExtra[i] as number) + rng.uniform(0, 3);
      }
      return;
    }
    case 'trafficBurst': {
      const [a, b] = span(1, 4);
      const factor = rng.uniform(1.2, 1.9);
      for (let i = a; i <= b; i += 1) d.trafficScale[i] = (d.trafficScale[i] as number) * factor;
      return;
    }
    case 'latencyDrift': {
      // Latency up and nothing else, for no reason anyone finds: must not read as a clean fault.
      const factor = rng.uniform(1.15, 2);
      for (let i = at; i < n; i += 1) d.latencyScale[i] = (d.latencyScale[i] as number) * factor;
      return;
    }
    case 'levelShift': {
      // Permanent and modest: a config change, a new cache size, a rebalanced shard.
      const which = rng.int(0, 3);
      const size = rng.uniform(0.05, 0.4) * (rng.chance(0.5) ? 1 : -1);
      for (let i = at; i < n; i += 1) {
        if (which === 0) d.trafficScale[i] = (d.trafficScale[i] as number) * (1 + size);
        else if (which === 1) d.memExtra[i] = (d.memExtra[i] as number) + size * 0.3;
        else if (which === 2) d.cpuScale[i] = (d.cpuScale[i] as number) * (1 + size);
        else d.latencyScale[i] = (d.latencyScale[i] as number) * (1 + size);
      }
      return;
    }
  }
}

/** Benign kinds for quiet windows, weighted toward latency noise (the commonest false alarm). */
export const QUIET_WINDOW_KINDS: readonly BenignKind[] = ['latencyBurst', 'latencyBurst', 'latencyDrift', 'latencyDrift', 'levelShift', 'levelShift', 'levelShift', 'levelShift', 'cron', 'deploy', 'trafficBurst'];

/** Sprinkles benign events over the grid at about `perStep` events per step. */
export function drawBenignEvents(d: Drivers, rng: Random, perStep: number): void {
  const n = d.trafficScale.length;
  const count = Math.floor(n * perStep + rng.next());
  for (let k = 0; k < count; k += 1) applyBenignEvent(d, rng.pick(BENIGN_KINDS), rng.int(0, n - 1), rng);
}
