/**
 * The compare view (webview entry): a sortable table of every run in the workspace, band structures of the
 * ticked runs overlaid on one plot (aligned at each run's VBM; one shared path when the paths match,
 * otherwise side by side), and a trend plot of any numeric column against a structural descriptor or a value
 * the user types per run. Talks to the host only through the compare messages of src/protocol/; computes
 * no physics (every number comes from the core, in the host). Strict-CSP friendly: no eval, no inline
 * handlers or styles. This file only wires the modules together.
 */
import { CompareViewToHostType } from '../../src/protocol';
import { vscodeApi } from '../shared/vscodeApi';
import { watchTheme } from '../shared/themeWatch';
import { adoptStyleSheet } from '../shared/styleSheet';
import { COMPARE_VIEW_CSS } from './styles';
import { buildComparePage } from './pageSkeleton';
import { CompareViewApp } from './compareApp';
import { listenToHost } from './messages';

adoptStyleSheet(document, COMPARE_VIEW_CSS);

const page = buildComparePage();
const app = new CompareViewApp(page, vscodeApi());

page.moreBox.addEventListener('change', () => app.setShowMore(page.moreBox.checked));
page.refSelect.addEventListener('change', () => app.chooseReference(page.refSelect.value));
page.annotationsBox.addEventListener('change', () =>
  app.post({ type: CompareViewToHostType.SetAnnotationsAsRuns, value: page.annotationsBox.checked }),
);
page.rescanBtn.addEventListener('click', () => app.post({ type: CompareViewToHostType.Rescan }));
page.trendY.addEventListener('change', () => app.chooseTrendAxis('y', page.trendY.value));
page.trendX.addEventListener('change', () => app.chooseTrendAxis('x', page.trendX.value));
listenToHost(app);
new ResizeObserver(() => app.schedule()).observe(page.overlay.plot);
new ResizeObserver(() => app.schedule()).observe(page.trend.plot);
watchTheme(document, () => app.themeChanged());
app.post({ type: CompareViewToHostType.Ready });

// The instance, for tests (read-only use).
(window as unknown as { valleyscopeCompareView: CompareViewApp }).valleyscopeCompareView = app;
