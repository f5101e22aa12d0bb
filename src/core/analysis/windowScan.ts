/**
 * Mass versus fit window at an extremum: the curve a reviewer looks at to judge non-parabolicity (a flat
 * curve: parabolic; a mass rising with the window: Kane-like non-parabolicity).
 */
import type { BandStructure, MassFit } from '../model';
import type { AnalysisSettings } from './analyze';
import { fitExtremumAt } from './massEngine';

export interface WindowScanPoint {
  window_meV: number;
  masses: MassFit[];
}

/** Default windows of the scan, meV: 10 to 200 (common practice spans 10-100 meV; 200 shows non-parabolicity). */
export const SCAN_WINDOWS_MEV = [10, 15, 20, 25, 30, 40, 50, 60, 80, 100, 125, 150, 175, 200];

/**
 * Mass versus window at an extremum (the clicked point snaps as in fitExtremumAt, or not with `at`): the curve that shows
 * how parabolic the band is. Each entry holds the directional masses fitted in that window.
 */
export function massWindowScan(
  bs: BandStructure,
  spin: number,
  kIndex: number,
  band0: number,
  settings: AnalysisSettings,
  windows: number[] = SCAN_WINDOWS_MEV,
  at?: { maximum: boolean },
): WindowScanPoint[] {
  return windows.map((w) => ({ window_meV: w, masses: fitExtremumAt(bs, spin, kIndex, band0, { ...settings, window_meV: w }, at).masses }));
}
