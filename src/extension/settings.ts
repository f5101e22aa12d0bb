/**
 * The user's settings (contributes.configuration `valleyscope.*`), read and checked. Pure: the caller passes
 * a getter (vscode's WorkspaceConfiguration.get in the extension, a map in tests).
 */
import { DEFAULT_SETTINGS, type AnalysisSettings } from '../core/analysis/analyze';
import { methodId } from '../core/analysis/methods';
import type { EnergyReference } from '../protocol';

export interface ExtensionSettings {
  analysis: AnalysisSettings;
  energyReference: EnergyReference;
  /** Refuse eigenvalue files above this size (bytes); 0: no limit. */
  maxBytes: number;
  /** Files at least this large are read on a worker thread (bytes). */
  workerThresholdBytes: number;
}

export const SETTING_KEYS = {
  window: 'fit.window_meV',
  method: 'fit.method',
  energyReference: 'energyReference',
  range: 'extrema.range_eV',
  degeneracy: 'extrema.degeneracy_meV',
  maxFileSize: 'maxFileSizeMB',
  workerThreshold: 'workerThresholdMB',
} as const;

export type SettingGetter = (key: string) => unknown;

const REFERENCES: EnergyReference[] = ['vbm', 'fermi', 'raw'];

function num(v: unknown, fallback: number, min: number, max: number): number {
  return typeof v === 'number' && Number.isFinite(v) && v >= min && v <= max ? v : fallback;
}

/** Settings with anything missing or out of range replaced by its default. */
export function readSettings(get: SettingGetter): ExtensionSettings {
  const method = get(SETTING_KEYS.method);
  const ref = get(SETTING_KEYS.energyReference);
  const maxMB = num(get(SETTING_KEYS.maxFileSize), 1024, 0, 1e6);
  const workerMB = num(get(SETTING_KEYS.workerThreshold), 4, 0, 1e6);
  return {
    analysis: {
      window_meV: num(get(SETTING_KEYS.window), DEFAULT_SETTINGS.window_meV, 0.1, 5000),
      method: (typeof method === 'string' ? methodId(method) : null) ?? DEFAULT_SETTINGS.method,
      range_eV: num(get(SETTING_KEYS.range), DEFAULT_SETTINGS.range_eV, 0, 20),
      degeneracy_meV: num(get(SETTING_KEYS.degeneracy), DEFAULT_SETTINGS.degeneracy_meV, 0, 1000),
    },
    energyReference: typeof ref === 'string' && (REFERENCES as string[]).includes(ref) ? (ref as EnergyReference) : 'vbm',
    maxBytes: Math.round(maxMB * 1e6),
    workerThresholdBytes: Math.round(workerMB * 1e6),
  };
}
