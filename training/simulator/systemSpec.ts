/**
 * The fixed structure of one simulated system, drawn from its seed only: service, naming style,
 * step, physical parameters and the exported metric subset with names, units and copies.
 * Faults and noise are drawn separately, so one system can be rendered with any fault.
 */
import type { Family } from '../../extension/core/frame/types';
import { ROLES, IRRELEVANT_ROLES, QUANTILES, type NameForm, type RoleDef } from './catalogue';
import type { ServiceParams } from './latentModel';
import { createRandom, mixSeeds, type Random } from './random';
import type { NamingStyle } from './types';

/** Invented services of the invented company "Larkspur Provisions" (grocery delivery). */
export const SERVICES = [
  'basket-api', 'pantry-db', 'courier-gateway', 'checkout-web', 'stock-sync', 'route-planner',
  'payment-relay', 'shelf-search', 'order-ledger', 'substitution-engine', 'slot-booker', 'crate-tracker',
] as const;

/** Sampling intervals seen in practice, 1 s to 5 min. */
export const STEP_CHOICES_MS = [1000, 5000, 10_000, 15_000, 30_000, 60_000, 60_000, 120_000, 300_000] as const;

export interface SeriesSpec {
  readonly id: string;
  readonly name: string;
  readonly labels: Readonly<Record<string, string>>;
  readonly unit?: string;
  readonly kind: 'gauge' | 'counter';
  readonly trueFamily: Family;
  readonly role: RoleDef;
  readonly form: NameForm;
  /** Multiplier of the observable for this copy (quantile × per-instance spread × unit scale). */
  readonly factor: number;
  readonly tailWeight: number;
  readonly noiseSigma: number;
  readonly gapProbability: number;
  readonly resetProbability: number;
  /** Significant digits gauges are rounded to (exports often keep few); 0 = full precision. */
  readonly significantDigits: number;
}

export interface SystemSpec {
  readonly id: string;
  readonly seed: number;
  readonly service: string;
  readonly dependency: string;
  readonly namingStyle: NamingStyle;
  readonly stepMs: number;
  readonly params: ServiceParams;
  readonly series: readonly SeriesSpec[];
}

function drawParams(rng: Random): ServiceParams {
  const serverLatencyS = rng.logUniform(0.005, 0.6);
  return {
    requestRatePerS: rng.logUniform(2, 3000),
    dailyAmplitude: rng.uniform(0.05, 0.6),
    dailyPhaseRad: rng.uniform(0, 2 * Math.PI),
    trafficNoiseSigma: rng.uniform(0.02, 0.15),
    cores: rng.pick([2, 4, 8, 16]),
    cpuBase: rng.uniform(0.01, 0.12),
    cpuPerLoad: rng.uniform(0.05, 0.45),
    cpuNoiseSigma: rng.uniform(0.02, 0.12),
    memBaseRatio: rng.uniform(0.2, 0.65),
    memLimitBytes: rng.pick([512, 1024, 2048, 4096, 8192, 16384]) * 1048576,
    memNoiseSigma: rng.uniform(0.005, 0.04),
    diskBase: rng.uniform(0.005, 0.1),
    diskPerLoad: rng.uniform(0.01, 0.2),
    serverLatencyS,
    dependencyLatencyS: serverLatencyS * rng.uniform(0.1, 0.8),
    dependencyShare: rng.uniform(0.1, 0.8),
    persistenceShare: rng.uniform(0, 1),
    queueSensitivity: rng.uniform(1, 4),
    errorBaseRatio: rng.logUniform(0.0002, 0.02),
    poolSize: rng.pick([5, 10, 20, 50]),
    poolBaseRatio: rng.uniform(0.1, 0.5),
    bytesPerRequest: rng.logUniform(500, 200_000),
    retransPerRequest: rng.logUniform(0.001, 0.05),
    tailSigma: rng.uniform(0.05, 0.6),
    burstProbability: rng.uniform(0, 0.02),
    slowDriftSigma: rng.uniform(0, 0.3),
    timeoutSensitivity: rng.chance(0.5) ? 0 : rng.uniform(0.001, 0.01),
    lossErrorShare: rng.chance(0.5) ? 0 : rng.uniform(0.1, 1),
  };
}

const fill = (template: string, vars: Readonly<Record<string, string>>): string =>
  template.replace(/\{(\w+)\}/g, (whole, key: string) => vars[key] ?? whole);

/** Serialises a series identity the way the frame does: name plus sorted labels. */
export function formatSeriesId(name: string, labels: Readonly<Record<string, string>>): string {
  const keys = Object.keys(labels).sort();
  if (keys.length === 0) return name;
  return `${name}{${keys.map((k) => `${k}="${labels[k] ?? ''}"`).join(',')}}`;
}

function expandRole(role: RoleDef, style: NamingStyle, vars: Record<string, string>, hosts: readonly string[], rng: Random, params: ServiceParams, usedNames: Set<string> = new Set()): SeriesSpec[] {
  // A second spelling must differ in name: one name in two units would be one broken series.
  const forms = role.forms[style].filter((f) => !usedNames.has(f.name));
  if (forms.length === 0) return [];
  const form = rng.pick(forms);
  usedNames.add(form.name);
  const unitScale = form.scale * (role.baseScale?.(params) ?? 1);
  const copies: Array<{ vars: Record<string, string>; factor: number; tailWeight: number; extraLabel?: [string, string] }> = [];
  if (role.copies === 'percentile') {
    const count = rng.int(1, 4);
    const start = rng.int(0, QUANTILES.length - count);
    for (const q of QUANTILES.slice(start, start + count)) copies.push({ vars: { ...vars, q: q.short, qv: q.value }, factor: q.multiplier, tailWeight: q.tailWeight });
  } else {
    const names = role.copies === 'device' ? ['sda', 'nvme0n1', 'sdb'] : hosts;
    const count = role.copies === 'single' ? 1 : rng.int(1, Math.min(names.length, 3));
    for (let k = 0; k < count; k += 1) {
      const label = names[k] as string;
      const key = role.copies === 'device' ? 'dev' : 'host';
      copies.push({ vars: { ...vars, [key]: label }, factor: count > 1 ? Math.exp(0.15 * rng.normal()) : 1, tailWeight: 0, extraLabel: role.copies === 'single' ? undefined : [key === 'dev' ? 'device' : style === 'dotted' ? 'host.name' : 'instance', label] });
    }
  }
  const noiseSigma = rng.uniform(0.01, 0.08);
  // One rounding for all copies of a metric, as one exporter writes them.
  const significantDigits = form.kind === 'gauge' && rng.chance(0.35) ? rng.pick([1, 2, 2, 3]) : 0;
  return copies.map((copy) => {
    const name = fill(form.name, copy.vars);
    const labels: Record<string, string> = {};
    for (const [k, v] of Object.entries(form.labels ?? {})) labels[k] = fill(v, copy.vars);
    const isLabelled = form.name.includes('{host}') || form.name.includes('{dev}') || Object.values(form.labels ?? {}).some((v) => v.includes('{'));
    if (copy.extraLabel && !isLabelled && style !== 'free_text') labels[copy.extraLabel[0]] = copy.extraLabel[1];
    const finalName = style === 'free_text' && copy.extraLabel && !isLabelled && copies.length > 1 ? `${name} [${copy.extraLabel[1]}]` : name;
    return {
      id: formatSeriesId(finalName, labels), name: finalName, labels, unit: form.unit, kind: form.kind,
      trueFamily: role.trueFamily, role, form, factor: copy.factor * unitScale, tailWeight: copy.tailWeight,
      noiseSigma: noiseSigma * (1 + copy.tailWeight), gapProbability: 0, resetProbability: form.kind === 'counter' ? rng.uniform(0, 0.002) : 0,
      significantDigits,
    };
  });
}

/** Draws the structure of system `seed`; the same seed always gives the same structure. */
export function buildSystemSpec(seed: number): SystemSpec {
  const rng = createRandom(mixSeeds(seed, 0x5e7));
  const service = rng.pick(SERVICES);
  const dependency = rng.pick(SERVICES.filter((s) => s !== service));
  const namingStyle = rng.pick<NamingStyle>(['dotted', 'snake_total', 'free_text']);
  const stepMs = rng.pick(STEP_CHOICES_MS);
  const params = drawParams(rng);
  const shortName = service.split('-')[0] as string;
  const hosts = [1, 2, 3].map((k) => `${shortName}-${k}`);
  const vars = { svc: service, svc_: `${service.replace(/-/g, '_')}_`, dep: dependency };
  const gapLevel = rng.chance(0.5) ? 0 : rng.logUniform(0.001, 0.05);
  const series: SeriesSpec[] = [];
  const seen = new Set<string>();
  const density = rng.uniform(0.5, 1.3);
  // Real exports mix sources: some systems carry a few metrics named in another style.
  const mixShare = rng.chance(0.6) ? 0 : rng.uniform(0.1, 0.35);
  const styles: readonly NamingStyle[] = ['dotted', 'snake_total', 'free_text'];
  for (const role of [...ROLES, ...IRRELEVANT_ROLES]) {
    if (!rng.chance(Math.min(0.95, role.inclusion * density))) continue;
    // A second spelling of the same role (pod and node, process and host) inflates a family.
    const copies = role.isIrrelevant ? 1 : rng.chance(0.25) ? 2 : 1;
    const usedNames = new Set<string>();
    for (let copy = 0; copy < copies; copy += 1) {
      const style = rng.chance(mixShare) ? rng.pick(styles) : namingStyle;
      for (const s of expandRole(role, style, vars, hosts, rng, params, usedNames)) {
        if (seen.has(s.id)) continue;
        seen.add(s.id);
        series.push({ ...s, gapProbability: rng.chance(0.5) ? gapLevel : 0 });
      }
    }
  }
  if (series.length === 0) series.push(...expandRole(ROLES[0] as RoleDef, namingStyle, vars, hosts, rng, params));
  return { id: `sys-${seed}-${service}`, seed, service, dependency, namingStyle, stepMs, params, series };
}
