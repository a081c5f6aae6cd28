import { createLibraryEntry } from '../../../extension/core/model/libraryEntry';
import type { LibraryEntry } from '../../../extension/core/model/libraryTypes';

/** A small valid entry for tests (invented scenario: Larkspur Provisions' basket-api). */
export function makeEntry(overrides: { id: string; label: string; embedding?: number[]; postmortem?: string; modelVersion?: string }): LibraryEntry {
  return createLibraryEntry({
    id: overrides.id,
    label: overrides.label,
    window: { startMs: 1_764_000_000_000, endMs: 1_764_000_600_000 },
    baseline: { startMs: 1_763_996_400_000, endMs: 1_763_999_940_000 },
    exportSha256: 'a'.repeat(64),
    exportFile: 'exports/basket-api-2026-11-04.csv',
    ...(overrides.postmortem !== undefined ? { postmortem: overrides.postmortem } : {}),
    createdMs: 1_764_100_000_000,
    modelVersion: overrides.modelVersion ?? 'test-1',
    embedding: overrides.embedding ?? [0.25, -0.5, 1],
    metrics: [
      { id: 'basket_api_cpu_utilization', name: 'basket_api_cpu_utilization', family: 'cpu', baseline: [0.2, 0.21, 0.19], window: [0.9, 0.95, Number.NaN] },
      { id: 'pantry_db_pool_pending', name: 'pantry_db_pool_pending', family: 'saturation', baseline: [1, 0, 2], window: [40, 55, 61] },
    ],
  });
}
