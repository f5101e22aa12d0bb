/**
 * The band view's stylesheet, adopted as a constructable stylesheet (allowed by a strict content security
 * policy without 'unsafe-inline'). Colours come from VS Code's theme variables.
 */
export const BAND_VIEW_CSS = `
:root { color-scheme: light dark; }
[hidden] { display: none !important; }
body { margin: 0; padding: 0; background: var(--vscode-editor-background); color: var(--vscode-foreground);
  font-family: var(--vscode-font-family, system-ui, sans-serif); font-size: var(--vscode-font-size, 13px); }
.vs-root { display: flex; flex-direction: column; height: 100vh; box-sizing: border-box; padding: 6px 10px; gap: 6px; }
.vs-bar { display: flex; flex-wrap: wrap; align-items: center; gap: 6px 12px; }
.vs-title { font-weight: 600; }
.vs-gap { font-variant-numeric: tabular-nums; }
.vs-bar label { display: inline-flex; align-items: center; gap: 4px; color: var(--vscode-descriptionForeground); }
.vs-note { color: var(--vscode-descriptionForeground); font-size: 0.92em; }
.vs-caution-line { margin: 0; padding: 3px 8px; border-left: 3px solid var(--vscode-editorWarning-foreground, #cca700);
  background: var(--vscode-textBlockQuote-background, transparent); color: var(--vscode-foreground); font-size: 0.92em; }
.vs-banner { margin: 0; padding: 4px 8px; border: 1px solid var(--vscode-inputValidation-warningBorder, #cca700);
  background: var(--vscode-inputValidation-warningBackground, transparent); }
.vs-main { display: flex; flex: 1 1 auto; min-height: 0; gap: 10px; }
.vs-plot { position: relative; flex: 1 1 auto; min-width: 200px; min-height: 200px; outline: none; }
.vs-plot:focus-visible { outline: 2px solid var(--vscode-focusBorder); outline-offset: 1px; }
.vs-plot canvas { position: absolute; pointer-events: none; }
.vs-plot svg.vs-overlay { position: absolute; left: 0; top: 0; width: 100%; height: 100%; cursor: crosshair; }
.vs-axis path, .vs-axis line { stroke: var(--vscode-foreground); }
.vs-axis text { fill: var(--vscode-foreground); font-size: 11px; }
.vs-axis-title { fill: var(--vscode-foreground); font-size: 12px; }
.vs-sym-line { stroke: var(--vscode-editorIndentGuide-background1, var(--vscode-descriptionForeground)); stroke-width: 1; stroke-dasharray: 3 3; }
body.vscode-high-contrast .vs-sym-line { stroke: var(--vscode-contrastBorder); stroke-dasharray: none; }
/* Light High Contrast gives the contrast border and the first chart colour the same dark blue: the symmetry
   lines take the text colour and a dash instead, so they never read as a band. */
body.vscode-high-contrast-light .vs-sym-line { stroke: var(--vscode-editor-foreground, var(--vscode-foreground)); stroke-dasharray: 5 3; }
.vs-break { stroke: var(--vscode-foreground); stroke-width: 1; }
.vs-zero { stroke: var(--vscode-descriptionForeground); stroke-width: 1; stroke-dasharray: 6 3; }
.vs-fermi { stroke: var(--vscode-charts-orange, var(--vscode-editorWarning-foreground)); stroke-width: 1.5; stroke-dasharray: 2 2; }
.vs-fermi-label { fill: var(--vscode-charts-orange, var(--vscode-editorWarning-foreground)); font-size: 11px; }
.vs-gap-band { fill: var(--vscode-charts-foreground, var(--vscode-foreground)); opacity: 0.06; }
body.vscode-high-contrast .vs-gap-band, body.vscode-high-contrast-light .vs-gap-band { opacity: 0; }
.vs-frame { fill: none; stroke: var(--vscode-foreground); stroke-opacity: 0.5; }
.vs-mark { fill: none; stroke: var(--vscode-foreground); stroke-width: 1.5; }
body.vscode-high-contrast .vs-mark, body.vscode-high-contrast-light .vs-mark { stroke-width: 2.5; }
.vs-mark-label { fill: var(--vscode-foreground); font-size: 10px; font-weight: 600; paint-order: stroke;
  stroke: var(--vscode-editor-background); stroke-width: 3px; }
/* A mesh run's data points on its interpolated lines: open diamonds in the text colour (the bands are chart colours). */
.vs-mesh-point { fill: var(--vscode-editor-background); stroke: var(--vscode-editor-foreground, var(--vscode-foreground)); stroke-width: 1.25; }
body.vscode-high-contrast .vs-mesh-point, body.vscode-high-contrast-light .vs-mesh-point { stroke-width: 2; }
.vs-mesh-legend-box { fill: var(--vscode-editor-background); fill-opacity: 0.85; stroke: var(--vscode-foreground); stroke-opacity: 0.35; }
.vs-mesh-legend text { fill: var(--vscode-foreground); font-size: 11px; }
.vs-mesh-legend-line { stroke: var(--vscode-charts-blue, var(--vscode-foreground)); stroke-width: 1.5; }
.vs-selection { fill: none; stroke: var(--vscode-focusBorder); stroke-width: 2; stroke-dasharray: 3 2; }
.vs-fit-curve { fill: none; stroke: var(--vscode-charts-green); stroke-width: 3; stroke-opacity: 0.9; stroke-linecap: round; }
.vs-fit-window { stroke: var(--vscode-charts-green); stroke-width: 1; stroke-dasharray: 2 3; }
.vs-hover-dot { fill: var(--vscode-editor-background); stroke: var(--vscode-foreground); stroke-width: 1.5; }
.vs-hover-line { stroke: var(--vscode-foreground); stroke-opacity: 0.35; }
.vs-message { position: absolute; inset: 0; display: flex; align-items: center; justify-content: center; padding: 20px; text-align: center;
  background: color-mix(in srgb, var(--vscode-editor-background) 85%, transparent); }
.vs-readout { flex: 0 0 auto; overflow-wrap: anywhere; min-height: 1.4em; font-variant-numeric: tabular-nums; color: var(--vscode-foreground); }
.vs-status { flex: 0 0 auto; overflow-wrap: anywhere; min-height: 1.2em; color: var(--vscode-descriptionForeground); }
.vs-side { flex: 0 0 300px; box-sizing: border-box; overflow-x: hidden; overflow-y: auto; padding-right: 6px; border-left: 1px solid var(--vscode-panel-border, var(--vscode-contrastBorder, transparent)); padding-left: 10px; }
.vs-side h2 { font-size: 1.05em; margin: 4px 0 6px; }
.vs-side h3 { font-size: 0.95em; margin: 8px 0 4px; }
.vs-hint, .vs-muted { color: var(--vscode-descriptionForeground); }
.vs-fit-kind { font-weight: 600; }
.vs-fit-where { font-size: 0.92em; margin-bottom: 6px; }
.vs-masses { border-collapse: collapse; width: 100%; font-variant-numeric: tabular-nums; }
.vs-masses caption { text-align: left; font-weight: 600; padding: 4px 0; }
.vs-masses th, .vs-masses td { padding: 2px 4px; border-bottom: 1px solid var(--vscode-editorIndentGuide-background1, rgba(128,128,128,0.3)); text-align: left; }
.vs-num { text-align: right; }
.vs-undetermined td { font-style: italic; opacity: 0.75; }
.vs-degeneracy { display: grid; grid-template-columns: auto auto; gap: 2px 10px; margin: 6px 0; }
.vs-degeneracy dt { color: var(--vscode-descriptionForeground); }
.vs-degeneracy dd { margin: 0; }
.vs-tensor ul { margin: 2px 0; padding-left: 18px; }
.vs-fit-controls { display: grid; grid-template-columns: minmax(0, 1fr) 80px; gap: 4px 8px; align-items: center; margin: 8px 0; }
.vs-fit-controls .vs-control-label { grid-column: 1 / span 2; }
.vs-fit-controls .vs-range { grid-column: 1; width: 100%; margin: 0; accent-color: var(--vscode-charts-green); }
.vs-fit-controls .vs-window-field { grid-column: 2; width: 80px; }
.vs-fit-controls .vs-method { grid-column: 1 / span 2; width: 100%; }
.vs-fit-controls .vs-method-note { grid-column: 1 / span 2; margin: 0; font-size: 0.88em; }
.vs-method-line { margin: 2px 0; font-size: 0.92em; }
.vs-provenance-scroll { overflow-x: auto; max-width: 100%; }
.vs-provenance-table { border-collapse: collapse; font-size: 0.86em; font-variant-numeric: tabular-nums; }
.vs-provenance-table th, .vs-provenance-table td { padding: 1px 4px; text-align: left; white-space: nowrap;
  border-bottom: 1px solid var(--vscode-editorIndentGuide-background1, rgba(128,128,128,0.3)); }
.vs-provenance-table th { font-weight: 600; color: var(--vscode-descriptionForeground); white-space: normal; vertical-align: bottom; }
/* In the side panel (300 px) the table would scroll sideways: each fitted direction becomes a small card of
   label and value (the column heads stay in the page for screen readers; roles keep the table's meaning). */
.vs-side { container-type: inline-size; }
@container (max-width: 560px) {
  .vs-provenance-table thead { position: absolute; width: 1px; height: 1px; overflow: hidden; clip-path: inset(50%); white-space: nowrap; }
  .vs-provenance-table, .vs-provenance-table tbody { display: block; }
  .vs-provenance-table tr { display: grid; grid-template-columns: max-content 1fr; column-gap: 10px; padding: 3px 0;
    border-bottom: 1px solid var(--vscode-editorIndentGuide-background1, rgba(128,128,128,0.3)); }
  .vs-provenance-table td { display: contents; white-space: normal; }
  .vs-provenance-table td:first-child::before { content: none; }
  .vs-provenance-table td::before { content: attr(data-label); color: var(--vscode-descriptionForeground); }
  .vs-provenance-table .vs-prov-direction { display: block; grid-column: 1 / -1; font-weight: 600; }
}
.vs-spread-tag { font-size: 0.8em; color: var(--vscode-descriptionForeground); }
.vs-branch { width: 3em; }
.vs-masses-scroll { overflow-x: auto; max-width: 100%; }
.vs-with-branch { font-size: 0.88em; }
.vs-with-branch th, .vs-with-branch td { padding: 2px 2px; }
.vs-scan { margin: 6px 0; }
.vs-scan figcaption { font-size: 0.92em; color: var(--vscode-descriptionForeground); }
.vs-scan-current { stroke: var(--vscode-focusBorder); stroke-dasharray: 3 2; }
.vs-scan .err { stroke-width: 1; }
.vs-legend-item { display: inline-block; margin-right: 10px; font-size: 0.9em; }
.vs-legend-item::before { content: ''; display: inline-block; width: 12px; height: 3px; margin-right: 4px; vertical-align: middle; background: var(--vs-swatch); }
.vs-fit-warnings li { color: var(--vscode-editorWarning-foreground, inherit); }
.vs-cautions ul { padding-left: 18px; margin: 4px 0; }
.vs-cautions li { margin-bottom: 4px; font-size: 0.92em; }
.vs-review { margin: 4px 0 8px; padding: 4px 8px; border-left: 3px solid var(--vscode-textLink-foreground, currentColor); }
.vs-review p { margin: 2px 0; }
.vs-review-note { white-space: pre-wrap; }
.vs-review-problem { color: var(--vscode-editorWarning-foreground, inherit); }
/* Narrow views (beside a file on a laptop): the side panel goes below the plot, full width. */
@media (max-width: 900px) {
  .vs-main { flex-direction: column; }
  .vs-plot { flex: 1 1 auto; min-height: 240px; }
  .vs-side { flex: 0 1 auto; max-height: 45vh; border-left: none; padding-left: 0; padding-top: 6px;
    border-top: 1px solid var(--vscode-panel-border, var(--vscode-contrastBorder, transparent)); }
}
`;
