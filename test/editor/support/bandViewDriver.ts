/**
 * Driving the band view inside the editor: wait for it, read its canvas, click near a marked extremum,
 * read the mass table. Selectors are the view's own classes (webview/bandView/page.ts, toolbar.ts, massTable.ts and their neighbours).
 */
import type { FrameLocator } from 'playwright-core';
import { waitFor, type EditorSession } from './editorSession';

export interface CanvasInk {
  width: number;
  height: number;
  /** Fraction of pixel columns with at least one drawn pixel. */
  columnsInked: number;
  /** Largest number of separate drawn runs found in one column (bands crossing that column). */
  maxRunsInColumn: number;
  /** Number of distinct opaque colours (band colours, antialiasing). */
  colours: number;
}

/** Wait for the band view panel ("Bands: <folder>/<file>") and its drawn plot; returns the webview frame. */
export async function waitForBandView(s: EditorSession, runName: string, timeoutMs = 90_000): Promise<FrameLocator> {
  await s.page
    .locator('.tabs-container .tab', { hasText: `Bands: ${runName}` })
    .first()
    .waitFor({ timeout: timeoutMs });
  const view = s.webview();
  await view.locator('canvas.vs-bands').waitFor({ timeout: timeoutMs });
  // Drawn: the overlay carries the edge markers once data has arrived.
  await view.locator('svg.vs-overlay .vs-mark-group').first().waitFor({ state: 'attached', timeout: timeoutMs });
  return view;
}

/** What is painted on the band canvas (read back from its pixels inside the webview). */
export async function canvasInk(view: FrameLocator): Promise<CanvasInk> {
  return view.locator('canvas.vs-bands').evaluate((node) => {
    const c = node as HTMLCanvasElement;
    const ctx = c.getContext('2d');
    if (!ctx) throw new Error('the band canvas has no 2d context');
    const { width, height } = c;
    const px = ctx.getImageData(0, 0, width, height).data;
    let inkedCols = 0;
    let maxRuns = 0;
    const colours = new Set<number>();
    for (let x = 0; x < width; x++) {
      let runs = 0;
      let inRun = false;
      let any = false;
      for (let y = 0; y < height; y++) {
        const i = 4 * (y * width + x);
        const a = px[i + 3]!;
        const on = a > 64;
        if (on) {
          any = true;
          if (a === 255) colours.add((px[i]! << 16) | (px[i + 1]! << 8) | px[i + 2]!);
        }
        if (on && !inRun) runs++;
        inRun = on;
      }
      if (any) inkedCols++;
      if (runs > maxRuns) maxRuns = runs;
    }
    return { width, height, columnsInked: width ? inkedCols / width : 0, maxRunsInColumn: maxRuns, colours: colours.size };
  });
}

/**
 * Click a few pixels away from a marked extremum (kind 'cbm' or 'vbm'); returns the click point relative
 * to the marker, in CSS pixels.
 */
export async function clickNearMark(view: FrameLocator, kind: 'cbm' | 'vbm', dx = 3, dy = 2): Promise<void> {
  const mark = view.locator(`svg.vs-overlay .vs-mark-group.vs-mark-${kind} path.vs-mark`).first();
  await mark.waitFor({ state: 'attached', timeout: 30_000 });
  const box = await mark.boundingBox();
  if (!box) throw new Error(`the ${kind.toUpperCase()} marker has no position on screen`);
  // The marker is centred on the extremum; click near it, not on it. Coordinates are the page's (the
  // frames' offsets are included in boundingBox), so click through the page.
  const cx = box.x + box.width / 2 + dx;
  const cy = box.y + box.height / 2 + dy;
  await view.locator('svg.vs-overlay').click({ position: await relativeTo(view, 'svg.vs-overlay', cx, cy) });
}

async function relativeTo(view: FrameLocator, selector: string, pageX: number, pageY: number): Promise<{ x: number; y: number }> {
  const box = await view.locator(selector).boundingBox();
  if (!box) throw new Error(`${selector} is not on screen`);
  return { x: pageX - box.x, y: pageY - box.y };
}

export interface MassRow {
  towards: string;
  mass: number;
  text: string;
}

/** The rows of the side panel's mass table once a fit result is shown. */
export async function massRows(view: FrameLocator, timeoutMs = 60_000): Promise<MassRow[]> {
  const rows = view.locator('table.vs-masses tbody tr');
  return waitFor(
    async () => {
      const texts = await rows.allInnerTexts();
      const parsed = texts
        .map((t) => t.split('\t').map((c) => c.trim()))
        .filter((cells) => cells.length >= 2 && Number.isFinite(Number(cells[1]!.replace('−', '-'))))
        .map((cells, i) => ({ towards: cells[0]!, mass: Number(cells[1]!.replace('−', '-')), text: texts[i]! }));
      return parsed.length > 0 ? parsed : undefined;
    },
    'the mass table of the fit panel stayed empty',
    timeoutMs,
  );
}

/** The side panel's heading of the fitted extremum (e.g. "Conduction-band minimum (CBM)"). */
export async function fitKind(view: FrameLocator): Promise<string> {
  return (await view.locator('.vs-fit-head .vs-fit-kind').innerText()).trim();
}
