import assert from 'node:assert/strict';
import { checkExportBytes } from '../../../src/extension/exportBytes';

const enc = (s: string) => new TextEncoder().encode(s);

describe('extension: exported plot bytes', () => {
  it('accepts a PNG by its signature (PNG specification, ISO/IEC 15948: 89 50 4E 47 0D 0A 1A 0A)', () => {
    assert.equal(checkExportBytes('png', Uint8Array.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0])), null);
    assert.match(checkExportBytes('png', enc('GIF89a....'))!, /not a PNG/);
    assert.match(checkExportBytes('png', new Uint8Array(0))!, /empty/);
  });

  it('accepts SVG text with or without an XML declaration and comments', () => {
    assert.equal(checkExportBytes('svg', enc('<svg xmlns="http://www.w3.org/2000/svg" width="10"></svg>')), null);
    assert.equal(checkExportBytes('svg', enc('\uFEFF<?xml version="1.0"?>\n<!-- bands -->\n<svg>\n</svg>')), null);
    assert.match(checkExportBytes('svg', enc('<html><svg></svg></html>'))!, /not an SVG/);
    assert.match(checkExportBytes('svg', enc('<svgx/>'))!, /not an SVG/);
  });
});
