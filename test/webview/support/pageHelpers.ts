/**
 * Helpers evaluated inside the test page (plain JavaScript text: page functions must not depend on the
 * test runner's transpiler). Installed as window.__t by `installPageHelpers`.
 */
import type { Page } from 'playwright-core';

const HELPERS = String.raw`
window.__t = {
  app: function () { return window.valleyscopeBandView; },
  /** Offsets of the canvas inside the plot element. */
  canvasOffset: function () {
    var c = document.querySelector('canvas.vs-bands');
    var p = document.querySelector('.vs-plot');
    var cr = c.getBoundingClientRect(), pr = p.getBoundingClientRect();
    return { x: cr.left - pr.left, y: cr.top - pr.top, w: c.width, h: c.height, scale: c.width / cr.width };
  },
  /** RGBA at canvas pixel (x, y). */
  pixel: function (x, y) {
    var c = document.querySelector('canvas.vs-bands');
    var d = c.getContext('2d').getImageData(Math.round(x), Math.round(y), 1, 1).data;
    return [d[0], d[1], d[2], d[3]];
  },
  /**
   * For each band point [spin, k, band], whether it lies inside the plot and whether the canvas has an opaque
   * pixel within r pixels of where the view maps it; also the brightest such pixel's colour.
   */
  probe: function (pts, r) {
    var app = window.valleyscopeBandView;
    var c = document.querySelector('canvas.vs-bands');
    var img = c.getContext('2d').getImageData(0, 0, c.width, c.height);
    var off = window.__t.canvasOffset();
    return pts.map(function (q) {
      var s = app.screenOf(q[0], q[1], q[2]);
      var x = Math.round((s.x - off.x) * off.scale), y = Math.round((s.y - off.y) * off.scale);
      var inside = x >= r && y >= r && x < c.width - r && y < c.height - r;
      var hit = false, colour = null, bestA = 0;
      if (inside) {
        for (var dy = -r; dy <= r; dy++) for (var dx = -r; dx <= r; dx++) {
          var i = ((y + dy) * c.width + (x + dx)) * 4;
          var a = img.data[i + 3];
          if (a > 60) { hit = true; if (a > bestA) { bestA = a; colour = [img.data[i], img.data[i + 1], img.data[i + 2], a]; } }
        }
      }
      return { inside: inside, hit: hit, colour: colour, x: x, y: y };
    });
  },
  /** Probe every band point of a spin channel that lies inside the canvas (up to cap points). */
  probeVisible: function (spin, r, cap) {
    var app = window.valleyscopeBandView, off = window.__t.canvasOffset();
    var vm = app.vm, pts = [];
    for (var k = 0; k < vm.nk && pts.length < cap; k++) {
      var x = app.screenOf(spin, k, 0).x - off.x;
      if (x < r || x >= off.w - r) continue;
      for (var b = 0; b < vm.nBands && pts.length < cap; b++) {
        var y = app.screenOf(spin, k, b).y - off.y;
        if (y >= r && y < off.h - r) pts.push([spin, k, b]);
      }
    }
    return window.__t.probe(pts, r);
  },
  /** Opaque pixels in a square of half-size r around canvas pixel (x, y). */
  opaqueAround: function (x, y, r) {
    var c = document.querySelector('canvas.vs-bands');
    var img = c.getContext('2d').getImageData(Math.round(x) - r, Math.round(y) - r, 2 * r + 1, 2 * r + 1);
    var n = 0;
    for (var i = 3; i < img.data.length; i += 4) if (img.data[i] > 60) n++;
    return n;
  },
  /** Count of canvas pixels within distance tol (per channel) of an [r,g,b] colour. */
  countColour: function (rgb, tol) {
    var c = document.querySelector('canvas.vs-bands');
    var d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
    var n = 0;
    for (var i = 0; i < d.length; i += 4) {
      if (d[i + 3] > 200 && Math.abs(d[i] - rgb[0]) <= tol && Math.abs(d[i + 1] - rgb[1]) <= tol && Math.abs(d[i + 2] - rgb[2]) <= tol) n++;
    }
    return n;
  },
  /** Page coordinates of a point given in plot-element coordinates. */
  pagePoint: function (x, y) {
    var pr = document.querySelector('.vs-plot').getBoundingClientRect();
    return { x: pr.left + x, y: pr.top + y };
  },
  text: function (sel) {
    return Array.prototype.map.call(document.querySelectorAll(sel), function (e) { return e.textContent; });
  },
};
`;

export async function installPageHelpers(page: Page): Promise<void> {
  await page.evaluate(HELPERS);
}

export function hexToRgb(hex: string): [number, number, number] {
  const h = hex.replace('#', '');
  return [parseInt(h.slice(0, 2), 16), parseInt(h.slice(2, 4), 16), parseInt(h.slice(4, 6), 16)];
}

/**
 * Polls a JavaScript expression in the page until it is truthy. (Playwright's waitForFunction evaluates its
 * predicate with eval inside the page, which the view's content security policy rightly forbids.)
 */
export async function waitForExpression(page: Page, expression: string, timeoutMs = 10_000): Promise<void> {
  const end = Date.now() + timeoutMs;
  for (;;) {
    if (await page.evaluate(expression)) return;
    if (Date.now() > end) throw new Error(`timed out after ${timeoutMs} ms waiting for: ${expression}`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

/** Per canvas column, the first and last opaque row (−1 when the column is empty); installed as __t.extents. */
export const COLUMN_EXTENTS = String.raw`
window.__t.extents = function () {
  var c = document.querySelector('canvas.vs-bands');
  var d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
  var top = [], bottom = [];
  for (var x = 0; x < c.width; x++) {
    var t = -1, b = -1;
    for (var y = 0; y < c.height; y++) {
      if (d[(y * c.width + x) * 4 + 3] > 60) { if (t < 0) t = y; b = y; }
    }
    top.push(t); bottom.push(b);
  }
  return { top: top, bottom: bottom };
};`;
