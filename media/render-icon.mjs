#!/usr/bin/env node
// Renders media/icon.svg (our own drawing) to media/icon.png, 128×128, with Debian's Chromium.
// Usage: node media/render-icon.mjs   (only needed after the SVG changes; the PNG is committed)
import { chromium } from 'playwright-core';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';

const here = import.meta.dirname;
const svg = readFileSync(join(here, 'icon.svg'), 'utf8');
const browser = await chromium.launch({
  executablePath: '/usr/bin/chromium',
  args: ['--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
try {
  const page = await browser.newPage({ viewport: { width: 128, height: 128 }, deviceScaleFactor: 1 });
  await page.setContent(`<html><body style="margin:0;background:transparent">${svg}</body></html>`);
  await page.locator('svg').screenshot({ path: join(here, 'icon.png'), omitBackground: true });
} finally {
  await browser.close();
}
