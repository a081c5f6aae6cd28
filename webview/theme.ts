/** Colours from the editor theme's CSS variables, read when drawing so theme switches apply. */
export interface ThemeColors {
  readonly foreground: string;
  readonly muted: string;
  readonly grid: string;
  readonly line: string;
  readonly incident: string;
  readonly baseline: string;
  readonly crosshair: string;
  readonly classes: readonly string[];
}

function readVar(style: CSSStyleDeclaration, name: string, fallback: string): string {
  const value = style.getPropertyValue(name).trim();
  return value || fallback;
}

export function readThemeColors(): ThemeColors {
  const style = getComputedStyle(document.body);
  return {
    foreground: readVar(style, '--vscode-editor-foreground', '#333'),
    muted: readVar(style, '--vscode-descriptionForeground', '#777'),
    grid: readVar(style, '--vscode-editorWidget-border', 'rgba(128,128,128,0.25)'),
    line: readVar(style, '--vscode-charts-blue', '#3b7dd8'),
    incident: readVar(style, '--vscode-charts-red', '#d23f3f'),
    baseline: readVar(style, '--vscode-charts-green', '#3f9f52'),
    crosshair: readVar(style, '--vscode-editorCursor-foreground', '#888'),
    classes: ['--vscode-charts-foreground', '--vscode-charts-orange', '--vscode-charts-purple', '--vscode-charts-yellow', '--vscode-charts-blue', '--vscode-charts-green', '--vscode-charts-red', '--vscode-terminal-ansiCyan']
      .map((name, i) => readVar(style, name, ['#888', '#d18616', '#8a54c9', '#c9a416', '#3b7dd8', '#3f9f52', '#d23f3f', '#1aa3a3'][i])),
  };
}

/** A colour with alpha, for shading; accepts #rgb/#rrggbb/rgb(); anything else is returned as is. */
export function withAlpha(color: string, alpha: number): string {
  const hex = /^#([0-9a-f]{3}|[0-9a-f]{6})$/i.exec(color);
  if (hex) {
    const h = hex[1].length === 3 ? hex[1].split('').map((c) => c + c).join('') : hex[1];
    const [r, g, b] = [0, 2, 4].map((i) => parseInt(h.slice(i, i + 2), 16));
    return `rgba(${r}, ${g}, ${b}, ${alpha})`;
  }
  const rgb = /^rgba?\(([^)]+)\)$/.exec(color);
  if (rgb) {
    const [r, g, b] = rgb[1].split(',').map((s) => s.trim());
    return `rgba(${r}, ${g}, ${b}, ${alpha})`;
  }
  return color;
}
