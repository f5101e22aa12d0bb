/**
 * The sentences the band view writes about a point of the plot: extremum kinds, the read-out of a band point,
 * a marker's tooltip, the status line after a fit. Pure (text only).
 */
import type { ExtremumMark, ExtremumReport } from '../../src/protocol';
import type { ReferenceChoice } from './energyReference';
import type { Candidate } from './keyNavigation';
import { fixed, fracK, sig } from '../shared/format';
import { energyAt, labelNear, type ViewModel } from './viewModel';
import { meshPointNear, meshPointNote } from './meshPoints';

export function kindName(kind: string): string {
  switch (kind) {
    case 'vbm':
      return 'Valence-band maximum (VBM)';
    case 'cbm':
      return 'Conduction-band minimum (CBM)';
    case 'valley':
      return 'Secondary conduction minimum';
    case 'peak':
      return 'Secondary valence maximum';
    default:
      return 'Extremum';
  }
}

/** "E − E_VBM", "E − E_F" or "E" (raw energies). */
export function energyName(ref: ReferenceChoice): string {
  return ref.subscript ? `E − E_${ref.subscript}` : 'E';
}

/** The read-out of one band point: k-point, label, fractional (and cartesian) k, band, spin, energy. */
export function describePoint(vm: ViewModel, ref: ReferenceChoice, spin: number, k: number, band0: number): string {
  const kf = vm.kpoints.subarray(3 * k, 3 * k + 3);
  const label = labelNear(vm, k);
  const c = vm.cartesian;
  const cart = c ? ` · k = (${fixed(c[3 * k]!, 3)}, ${fixed(c[3 * k + 1]!, 3)}, ${fixed(c[3 * k + 2]!, 3)}) Å⁻¹` : '';
  const spinText = vm.nSpin === 2 ? (spin === 0 ? ' (spin ↑)' : ' (spin ↓)') : '';
  const e = fixed(energyAt(vm, spin, k, band0) - ref.offset, 4);
  return `k-point ${k + 1}${label ? ` ${label}` : ''} · k = ${fracK(kf)} (fractional)${cart} · band ${band0 + 1}${spinText} · ${energyName(ref)} = ${e} eV${meshText(vm, ref, spin, k, band0)}`;
}

/** For a mesh run's interpolated bands: that the point is interpolated, and the data of a mesh point drawn there. */
function meshText(vm: ViewModel, ref: ReferenceChoice, spin: number, k: number, band0: number): string {
  const m = vm.meshPoints;
  if (!m) return '';
  const d = vm.distance;
  // The path sample nearest a mesh point is within half a step of it.
  const reach = 0.5 * Math.max(k > 0 ? d[k]! - d[k - 1]! : 0, k + 1 < vm.nk ? d[k + 1]! - d[k]! : 0);
  return meshPointNote(m, meshPointNear(m, d[k]!, reach), spin, band0, ref.offset);
}

/** The status line when an extremum is selected. */
export function selectedText(vm: ViewModel, ref: ReferenceChoice, c: Candidate): string {
  const name = c.kind ? kindName(c.kind) : c.sign > 0 ? 'Local maximum' : 'Local minimum';
  return `Selected: ${name}, ${describePoint(vm, ref, c.spin, c.kIndex, c.band0)}. Enter fits it.`;
}

/** A marker's tooltip: what it is, where, and how to fit it. */
export function markTitle(vm: ViewModel, ref: ReferenceChoice, m: ExtremumMark): string {
  const where = labelNear(vm, m.kIndex);
  const spin = vm.nSpin === 2 ? (m.spin === 1 ? ', spin down' : ', spin up') : '';
  return `${kindName(m.kind)}: band ${m.band0 + 1}${spin}, k-point ${m.kIndex + 1}${where ? ` (${where})` : ''}, ${energyName(ref)} = ${fixed(m.eV - ref.offset, 3)} eV. Click it to fit.`;
}

/** The status line after a fit: the kind, the band and each direction's mass. */
export function fitDoneText(x: ExtremumReport): string {
  const masses = x.masses.map((f) => `${f.towards} ${sig(f.mass, 3)} mₑ`).join(', ') || 'no direction fitted';
  return `Fit done: ${kindName(x.kind)} of band ${x.band}, ${masses}.`;
}
