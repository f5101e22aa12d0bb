/**
 * The inside of one vasprun.xml `<kpoints>` element, for both eigenvalue sets (the self-consistent one in
 * vasprunStream.ts, the KPOINTS_OPT one in vasprunKpointsOpt.ts): the k-point list and weights (rows read straight
 * from the bytes), a line-mode `<generation>` (points per segment, segment ends) or a mesh one
 * (vasprunMeshGeneration.ts). Its owner hands it the events of the elements inside the `<kpoints>`.
 */
import type { DeclaredMesh, Vec3 } from '../../model';
import type { RowReader, XmlByteScanner } from '../xmlByteScanner';
import { DoubleBuffer } from '../doubleBuffer';
import { readVectorRows } from './vasprunEigenvalues';
import { VasprunMeshGeneration } from './vasprunMeshGeneration';

/** The owner's reading of a text as `expected` numbers, its errors in the owner's words. */
export type NumbersOf = (text: Uint8Array, length: number, what: string, expected: number) => number[];

export class VasprunKpoints {
  readonly kpointList = new DoubleBuffer(3 * 256);
  readonly weightList = new DoubleBuffer(256);
  /** True once a `<varray name="weights">` has closed. */
  weightsRead = false;
  private line: { divisions: number; ends: Vec3[] } | null = null;
  private inLine = false;
  private mesh = new VasprunMeshGeneration();
  private varrayName: string | null = null;
  private iName: string | null = null;
  private readonly rows: RowReader;

  constructor(
    private readonly sc: XmlByteScanner,
    private readonly numbers: NumbersOf,
  ) {
    this.rows = (s, buf, pos, end) => {
      const weights = this.varrayName === 'weights';
      return readVectorRows(s, buf, pos, end, weights ? this.weightList : this.kpointList, weights ? 1 : 3);
    };
  }

  get nk(): number {
    return this.kpointList.length / 3;
  }

  /** The line-mode generation when complete (at least 2 points per segment and 2 ends), else null. */
  get generation(): { divisions: number; ends: Vec3[] } | null {
    const g = this.line;
    return g && g.divisions >= 2 && g.ends.length >= 2 ? g : null;
  }

  /** The mesh a `<generation>` declares, or null. */
  declaredMesh(): DeclaredMesh | null {
    return this.mesh.declared();
  }

  /** Forget what was read (a new set's k-points replace an earlier one's). */
  reset(): void {
    this.kpointList.length = 0;
    this.weightList.length = 0;
    this.weightsRead = false;
    this.line = null;
    this.inLine = false;
    this.mesh = new VasprunMeshGeneration();
  }

  private listed(): boolean {
    return this.varrayName === 'kpointlist' || this.varrayName === 'weights';
  }

  /** An element opens inside the `<kpoints>` (`parent`: the name of the element it is in): true when its text is wanted. */
  open(name: string, attrs: Record<string, string> | null, parent: string | undefined): boolean {
    switch (name) {
      case 'generation':
        if (parent !== 'kpoints') return false;
        if (/^listgenerated$/i.test(attrs?.param ?? '')) {
          this.inLine = true;
          this.line = { divisions: 0, ends: [] };
        } else this.mesh.start(attrs?.param);
        return false;
      case 'varray':
        this.varrayName = attrs?.name ?? null;
        if (parent === 'kpoints' && this.listed()) this.sc.setRows(this.rows);
        return false;
      case 'v':
        if (this.inLine) return parent === 'generation';
        if (this.mesh.active) return parent === 'generation' && this.mesh.openV(attrs?.name);
        return parent === 'varray' && this.listed();
      case 'i':
        this.iName = attrs?.name ?? null;
        return this.inLine && this.iName === 'divisions';
      default:
        return false;
    }
  }

  /** An element inside the `<kpoints>` closes, with its text when it was wanted. */
  close(name: string, text: Uint8Array | null, length: number, parent: string | undefined): void {
    switch (name) {
      case 'v':
        if (text === null) return;
        if (this.mesh.active) return this.mesh.closeV(this.numbers(text, length, 'a k-mesh generation vector', 3));
        if (this.inLine) {
          const v = this.numbers(text, length, 'a line-mode segment end', 3);
          this.line?.ends.push([v[0]!, v[1]!, v[2]!]);
          return;
        }
        if (parent !== 'varray') return;
        if (this.varrayName === 'kpointlist') {
          for (const x of this.numbers(text, length, `k-point ${this.nk + 1}`, 3)) this.kpointList.push(x);
        } else if (this.varrayName === 'weights') {
          this.weightList.push(this.numbers(text, length, `the weight of k-point ${this.weightList.length + 1}`, 1)[0]!);
        }
        return;
      case 'i':
        if (this.inLine && this.iName === 'divisions' && text !== null && this.line)
          this.line.divisions = this.numbers(text, length, 'the number of points per line-mode segment', 1)[0]!;
        this.iName = null;
        return;
      case 'varray':
        if (parent === 'kpoints') {
          this.sc.setRows(null);
          if (this.varrayName === 'weights') this.weightsRead = true;
        }
        this.varrayName = null;
        return;
      case 'generation':
        this.inLine = false;
        this.mesh.end();
        return;
      default:
        return;
    }
  }
}
