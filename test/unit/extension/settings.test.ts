import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { readSettings, SETTING_KEYS } from '../../../src/extension/settings';
import { DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';

describe('extension: settings', () => {
  it('uses the analysis defaults when nothing is set', () => {
    const s = readSettings(() => undefined);
    assert.deepEqual(s.analysis, DEFAULT_SETTINGS);
    assert.equal(s.energyReference, 'vbm');
    assert.equal(s.maxBytes, 1024e6);
  });

  it('takes valid values and replaces invalid ones by defaults', () => {
    const set = new Map<string, unknown>([
      [SETTING_KEYS.window, 50],
      [SETTING_KEYS.method, 'kane'],
      [SETTING_KEYS.energyReference, 'fermi'],
      [SETTING_KEYS.range, 1.5],
      [SETTING_KEYS.maxFileSize, 0],
    ]);
    const s = readSettings((k) => set.get(k));
    assert.equal(s.analysis.window_meV, 50);
    assert.equal(s.analysis.method, 'kane');
    assert.equal(s.energyReference, 'fermi');
    assert.equal(s.analysis.range_eV, 1.5);
    assert.equal(s.maxBytes, 0);
    const bad = new Map<string, unknown>([
      [SETTING_KEYS.window, -5],
      [SETTING_KEYS.method, 'spline'],
      [SETTING_KEYS.energyReference, 'vacuum'],
      [SETTING_KEYS.range, Number.NaN],
    ]);
    const b = readSettings((k) => bad.get(k));
    assert.equal(b.analysis.window_meV, DEFAULT_SETTINGS.window_meV);
    assert.equal(b.analysis.method, DEFAULT_SETTINGS.method);
    assert.equal(b.energyReference, 'vbm');
    assert.equal(b.analysis.range_eV, DEFAULT_SETTINGS.range_eV);
  });

  it('offers in package.json the settings it reads, with the same defaults', async () => {
    const pkg = JSON.parse(readFileSync(join(__dirname, '../../../package.json'), 'utf8')) as {
      contributes: { configuration: { properties: Record<string, { default: unknown; enum?: string[] }> } };
    };
    const props = pkg.contributes.configuration.properties;
    for (const key of Object.values(SETTING_KEYS)) assert.ok(props[`valleyscope.${key}`], key);
    assert.equal(props['valleyscope.fit.window_meV']!.default, DEFAULT_SETTINGS.window_meV);
    assert.equal(props['valleyscope.fit.method']!.default, DEFAULT_SETTINGS.method);
    assert.equal(props['valleyscope.extrema.range_eV']!.default, DEFAULT_SETTINGS.range_eV);
    const { FIT_METHODS } = await import('../../../src/core/analysis/methods');
    assert.deepEqual(props['valleyscope.fit.method']!.enum, FIT_METHODS);
  });
});
