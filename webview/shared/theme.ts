/**
 * Colours of the band view, read from VS Code's theme variables so the view follows the editor's theme,
 * including high contrast. The assignment of chart colours to meanings is Valleyscope's own.
 */

export interface Palette {
  background: string;
  foreground: string;
  muted: string;
  grid: string;
  /** Filled (valence) bands. */
  filled: string;
  /** Empty (conduction) bands. */
  empty: string;
  /** Second spin channel when both are shown. */
  filled2: string;
  empty2: string;
  fit: string;
  marker: string;
  focus: string;
  gapTint: string;
  highContrast: boolean;
  /** Line width of bands, CSS px. */
  bandWidth: number;
}

function cssVar(style: CSSStyleDeclaration, name: string, fallback: string): string {
  const v = style.getPropertyValue(name).trim();
  return v || fallback;
}

export function themeKindFromBody(body: HTMLElement): 'light' | 'dark' | 'highContrast' | 'highContrastLight' {
  const k = body.getAttribute('data-vscode-theme-kind');
  if (k === 'vscode-high-contrast-light' || body.classList.contains('vscode-high-contrast-light')) return 'highContrastLight';
  if (k === 'vscode-high-contrast' || body.classList.contains('vscode-high-contrast')) return 'highContrast';
  if (k === 'vscode-light' || body.classList.contains('vscode-light')) return 'light';
  return 'dark';
}

export function readPalette(doc: Document): Palette {
  const style = getComputedStyle(doc.documentElement);
  const kind = themeKindFromBody(doc.body);
  const hc = kind === 'highContrast' || kind === 'highContrastLight';
  const light = kind === 'light' || kind === 'highContrastLight';
  const fg = cssVar(style, '--vscode-editor-foreground', cssVar(style, '--vscode-foreground', light ? '#1f1f1f' : '#cccccc'));
  return {
    background: cssVar(style, '--vscode-editor-background', light ? '#ffffff' : '#1e1e1e'),
    foreground: fg,
    muted: cssVar(style, '--vscode-descriptionForeground', light ? '#616161' : '#9d9d9d'),
    grid: hc
      ? cssVar(style, '--vscode-contrastBorder', fg)
      : cssVar(style, '--vscode-editorIndentGuide-background1', light ? '#d3d3d3' : '#404040'),
    filled: cssVar(style, '--vscode-charts-blue', light ? '#1a85ff' : '#3794ff'),
    empty: cssVar(style, '--vscode-charts-orange', light ? '#d18616' : '#d18616'),
    filled2: cssVar(style, '--vscode-charts-purple', '#b180d7'),
    empty2: cssVar(style, '--vscode-charts-yellow', '#cca700'),
    fit: cssVar(style, '--vscode-charts-green', light ? '#388a34' : '#89d185'),
    marker: fg,
    focus: cssVar(style, '--vscode-focusBorder', '#007fd4'),
    gapTint: cssVar(style, '--vscode-charts-foreground', fg),
    highContrast: hc,
    bandWidth: hc ? 2 : 1.25,
  };
}

/** Parse a CSS colour (#rgb, #rrggbb, #rrggbbaa, rgb(), rgba()) to RGBA bytes, via a canvas when needed. */
export function parseColour(colour: string, ctx?: CanvasRenderingContext2D | null): [number, number, number, number] {
  const c = colour.trim();
  let m = /^#([0-9a-f]{3})$/i.exec(c);
  if (m) {
    const h = m[1]!;
    return [parseInt(h[0]! + h[0]!, 16), parseInt(h[1]! + h[1]!, 16), parseInt(h[2]! + h[2]!, 16), 255];
  }
  m = /^#([0-9a-f]{6})([0-9a-f]{2})?$/i.exec(c);
  if (m) {
    const h = m[1]!;
    return [parseInt(h.slice(0, 2), 16), parseInt(h.slice(2, 4), 16), parseInt(h.slice(4, 6), 16), m[2] ? parseInt(m[2], 16) : 255];
  }
  m = /^rgba?\(\s*([\d.]+)[\s,]+([\d.]+)[\s,]+([\d.]+)(?:[\s,/]+([\d.]+%?))?\s*\)$/i.exec(c);
  if (m) {
    const a = m[4] === undefined ? 1 : m[4].endsWith('%') ? parseFloat(m[4]) / 100 : parseFloat(m[4]);
    return [Math.round(+m[1]!), Math.round(+m[2]!), Math.round(+m[3]!), Math.round(a * 255)];
  }
  if (ctx) {
    ctx.fillStyle = '#000000';
    ctx.fillStyle = c;
    const norm = String(ctx.fillStyle);
    if (norm !== c) return parseColour(norm);
  }
  return [128, 128, 128, 255];
}
