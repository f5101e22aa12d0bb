/**
 * vasprun.xml's `<kpoints><generation param="Gamma">` (or "Monkhorst-Pack"): the mesh the run declares, from
 * its `<v type="int" name="divisions">` and `<v name="usershift">` (VASP's own layout of the KPOINTS header).
 * Fed by VasprunStream's events; what it declares is only compared with the k-points (meshRunAnalysis.ts).
 */
import type { DeclaredMesh } from '../../model';
import { plausibleDivisions, requestedMesh, type RequestedMesh } from './kpointsMesh';

export class VasprunMeshGeneration {
  private centring: RequestedMesh['centring'] | null = null;
  private open = false;
  private reading: 'divisions' | 'usershift' | null = null;
  private divisions: number[] | null = null;
  private usershift: number[] = [0, 0, 0];

  /** A <generation> opens under <kpoints>: true when its param names a mesh (then its <v> are read). */
  start(param: string | undefined): boolean {
    const p = (param ?? '').trim().toLowerCase();
    this.centring = p === 'gamma' ? 'gamma' : p.startsWith('monkhorst') ? 'monkhorst-pack' : null;
    this.open = this.centring !== null;
    return this.open;
  }

  get active(): boolean {
    return this.open;
  }

  /** A <v> opens inside the mesh's <generation>: true when its text is wanted (divisions, usershift). */
  openV(name: string | undefined): boolean {
    this.reading = name === 'divisions' || name === 'usershift' ? name : null;
    return this.reading !== null;
  }

  /** The wanted <v>'s three numbers. */
  closeV(values: number[]): void {
    if (this.reading === 'divisions') this.divisions = values;
    else if (this.reading === 'usershift') this.usershift = values;
    this.reading = null;
  }

  end(): void {
    this.open = false;
  }

  /** The declared mesh, or null when none was declared or its divisions are not plausible. */
  declared(): DeclaredMesh | null {
    const n = this.divisions;
    if (this.centring === null || n === null || !plausibleDivisions(n) || !this.usershift.every(Number.isFinite)) return null;
    const m = requestedMesh(this.centring, n, this.usershift);
    const kind = m.centring === 'gamma' ? 'Γ-centred' : 'Monkhorst–Pack';
    return { divisions: m.divisions, shift: m.shift, source: `the vasprun.xml <generation> (${kind})` };
  }
}
