/**
 * The band view (webview entry): wiring only. Bands on a canvas, axes/labels/markers/fit overlay in SVG, d3
 * scales and zoom, a side panel for fits (bandViewApp.ts and the modules it names). Talks to the extension
 * host only through the typed messages of src/protocol; computes no physics (fits come back from the host,
 * which runs the core). Strict-CSP friendly: no eval, no inline handlers or styles, no remote loads.
 */
import '@vscode-elements/elements/dist/vscode-button/index.js';
import '@vscode-elements/elements/dist/vscode-single-select/index.js';
import '@vscode-elements/elements/dist/vscode-option/index.js';
import '@vscode-elements/elements/dist/vscode-textfield/index.js';
import { isHostToViewMessage, ViewToHostType } from '../../src/protocol';
import { receiveHostMessages } from '../shared/hostMessages';
import { adoptStyleSheet } from '../shared/styleSheet';
import { watchTheme } from '../shared/themeWatch';
import { vscodeApi } from '../shared/vscodeApi';
import { BandViewApp } from './bandViewApp';
import { BAND_VIEW_CSS } from './styles';
import type { ReferenceName, SpinName } from './viewState';

adoptStyleSheet(document, BAND_VIEW_CSS);
const app = new BandViewApp(vscodeApi());
const { plot, overlay: svg } = app.page;
const bar = app.toolbar;

/** A pointer event's position inside the plot element, CSS px. */
function local(ev: MouseEvent): { x: number; y: number } {
  const r = plot.getBoundingClientRect();
  return { x: ev.clientX - r.left, y: ev.clientY - r.top };
}

svg.addEventListener('mousemove', (ev) => {
  const p = local(ev);
  app.nav.hoverAt(p.x, p.y);
});
svg.addEventListener('mouseleave', () => app.nav.leave());
svg.addEventListener('click', (ev) => {
  const p = local(ev);
  app.nav.clickAt(p.x, p.y);
});
plot.addEventListener('keydown', (ev) => {
  if (app.nav.key(ev.key)) ev.preventDefault();
});
bar.refSelect.addEventListener('change', () => app.setReference(bar.refSelect.value as ReferenceName));
bar.spinSelect.addEventListener('change', () => app.setSpin(bar.spinSelect.value as SpinName));
bar.resetButton.addEventListener('click', () => app.resetZoom());
bar.svgButton.addEventListener('click', () => void app.exportPlot('svg'));
bar.pngButton.addEventListener('click', () => void app.exportPlot('png'));
bar.saveButton.addEventListener('click', () => app.save());

receiveHostMessages(
  window,
  isHostToViewMessage,
  (m) => app.handle(m),
  (message) => app.showError(message),
);
new ResizeObserver(() => app.layout()).observe(plot);
watchTheme(document, () => app.themeChanged());
app.post({ type: ViewToHostType.Ready });

// Exposes the instance for tests and the benchmark (read-only use).
(window as unknown as { valleyscopeBandView: BandViewApp }).valleyscopeBandView = app;
