/**
 * Shared wording of the incident library's say, so the findings markdown, the viewer, the CLI and
 * the editor's notices word it alike.
 */

/** "1 example", "3 examples". */
export function countExamples(count: number): string {
  return `${count} example${count === 1 ? '' : 's'}`;
}

/** One metric that moved alike, as "id ↑" / "id ↓"; `wrap` decorates the id (e.g. a code span). */
export function formatMover(mover: { readonly id: string; readonly direction: 'up' | 'down' }, wrap: (id: string) => string = (id) => id): string {
  return `${wrap(mover.id)} ${mover.direction === 'up' ? '↑' : '↓'}`;
}
