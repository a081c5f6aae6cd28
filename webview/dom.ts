/** Tiny element builder: text goes through textContent, never innerHTML (no markup injection). */
export function el<K extends keyof HTMLElementTagNameMap>(
  tag: K,
  props: { className?: string; text?: string; attrs?: Record<string, string> } = {},
  children: readonly (Node | null)[] = [],
): HTMLElementTagNameMap[K] {
  const node = document.createElement(tag);
  if (props.className) node.className = props.className;
  if (props.text !== undefined) node.textContent = props.text;
  for (const [key, value] of Object.entries(props.attrs ?? {})) node.setAttribute(key, value);
  for (const child of children) if (child) node.append(child);
  return node;
}

/** `2026-01-05 12:40Z`-style short UTC label for axes and readouts. */
export function formatShortUtc(timeMs: number): string {
  const iso = new Date(timeMs).toISOString();
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)}Z`;
}

/** Axis tick text in UTC: `HH:MM` for spans up to two days, `MM-DD` beyond (the heading names the date). */
export function formatTickUtc(timeMs: number, spanMs: number): string {
  const iso = new Date(timeMs).toISOString();
  return spanMs <= 2 * 86_400_000 ? `${iso.slice(11, 16)}Z` : iso.slice(5, 10);
}
