/**
 * Band data for the view, made the way the extension makes it: a run read by the core (src/core/load.ts with
 * the node FileAccessor), analysed by the core, shaped by src/extension/bandData.ts. Arrays are re-encoded as
 * base64 so they cross into the page as JSON (the extension sends ArrayBuffers).
 */
import { loadRun } from '../../../src/core/load';
import { nodeFileAccessor } from '../../../src/cli/nodeFileAccessor';
import { analyzeBandStructure, DEFAULT_SETTINGS } from '../../../src/core/analysis/analyze';
import { pathGeometry } from '../../../src/core/lattice/kpath';
import { buildBandData } from '../../../src/extension/bandData';
import { meshRunForView } from '../../../src/extension/meshRunView';
import { withMeshPoints } from '../../../src/extension/meshPointsData';
import { ensureSymmetryReady } from '../../../src/core/lattice/symmetry';
import { makeFitService } from '../../../src/extension/fitService';
import type { LoadedRun as HostRun } from '../../../src/extension/runLoader';
import type { PathGeometry } from '../../../src/core/lattice/kpath';
import type { FitResultMessage, FitTarget } from '../../../src/protocol';
import {
  decodeArray,
  encodeArrayBase64,
  HostToViewType,
  type BandData,
  type BandDataMessage,
  type EncodedArray,
  type EnvironmentData,
} from '../../../src/protocol';
import type { BandStructure, Report } from '../../../src/core/model';

export interface LoadedRun {
  bs: BandStructure;
  report: Report;
  geometry: PathGeometry;
  data: BandData;
}

function toBase64(a: EncodedArray): EncodedArray {
  return encodeArrayBase64(decodeArray(a), a.dtype);
}

export function jsonSafe(data: BandData): BandData {
  const m = data.meshPoints;
  return {
    ...data,
    distance: toBase64(data.distance),
    kpoints: toBase64(data.kpoints),
    cartesian: data.cartesian ? toBase64(data.cartesian) : null,
    energies: data.energies.map(toBase64),
    ...(m
      ? { meshPoints: { ...m, distance: toBase64(m.distance), kpoints: toBase64(m.kpoints), energies: m.energies.map(toBase64) } }
      : {}),
  };
}

export function bandDataFromStructure(bs: BandStructure, title: string): LoadedRun {
  const report = analyzeBandStructure(bs, DEFAULT_SETTINGS);
  const geometry = pathGeometry(bs);
  const data = buildBandData(bs, report, geometry, title, DEFAULT_SETTINGS, 'vbm');
  return { bs, report, geometry, data: jsonSafe(data) };
}

/**
 * A mesh run as the editor shows it (src/extension/meshRunView.ts): its interpolated bands along the standard
 * path, with its mesh points on the path (src/extension/meshPointsData.ts). `mesh` is the run as read.
 */
export async function loadMeshRunForView(path: string, title: string): Promise<LoadedRun & { mesh: BandStructure }> {
  await ensureSymmetryReady();
  const mesh = await loadRun(nodeFileAccessor, path);
  const shown = meshRunForView({ bs: mesh, report: analyzeBandStructure(mesh, DEFAULT_SETTINGS) }, DEFAULT_SETTINGS);
  const geometry = pathGeometry(shown.bs);
  const data = withMeshPoints(buildBandData(shown.bs, shown.report, geometry, title, DEFAULT_SETTINGS, 'vbm'), shown);
  return { bs: shown.bs, report: shown.report, geometry, data: jsonSafe(data), mesh };
}

export async function loadRunForView(path: string, title: string): Promise<LoadedRun> {
  await ensureSymmetryReady();
  const bs = await loadRun(nodeFileAccessor, path);
  return bandDataFromStructure(bs, title);
}

export const WRITABLE: EnvironmentData = { theme: 'dark', readOnly: false, readOnlyReason: null };

export function bandDataMessage(data: BandData, environment: EnvironmentData = WRITABLE): BandDataMessage {
  return { type: HostToViewType.BandData, data, environment };
}

/**
 * The host's answer to a requestFit, computed as the extension computes it (src/extension/fitService.ts,
 * the core's effective-mass engine). The fit service reads only the band structure and path geometry of a
 * run, so the editor-only fields (URIs, size) are left out here.
 */
export function hostFitResult(
  run: LoadedRun,
  requestId: number,
  target: FitTarget,
  window_meV: number,
  method: string,
  withScan: boolean,
): FitResultMessage {
  const service = makeFitService(() => DEFAULT_SETTINGS);
  const hostRun = { bs: run.bs, report: run.report, geometry: run.geometry } as unknown as HostRun;
  const out = service.fit(hostRun, target, window_meV, method, withScan);
  return { type: HostToViewType.FitResult, requestId, target, extremum: out.extremum, curves: out.curves, scan: out.scan };
}
