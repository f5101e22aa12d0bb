/**
 * Writer of VASP 6's KPOINTS_OPT block of vasprun.xml (<eigenvalues_kpoints_opt>, with the optional
 * <projected_kpoints_opt> and <dos_kpoints_opt> beside it), inserted into a vasprun.xml from writeVasprun.
 * Layout as VASP ≥ 6.3 writes it (the format's own layout, from memory): k-points, weights and a line-mode
 * generation inside its own <kpoints>, energy-only rows (`<field>eigene</field>`, no occupation) by default.
 */
import { fortranF } from './vasp';

export interface KpointsOptSpec {
  /** Fractional k-points of the set. */
  kpoints: number[][];
  nSpin: 1 | 2;
  /** Energies of every band at k-point k (0-based), spin s. */
  energies: (s: number, k: number) => number[];
  /** Occupations beside the energies (two columns); energy-only rows when absent. */
  occupations?: (s: number, k: number) => number[];
  /** A line-mode <generation>: points per segment and the segment ends. */
  generation?: { divisions: number; ends: number[][] };
  /** An automatic mesh's <generation> (param "Gamma" or "Monkhorst-Pack", divisions as "n1 n2 n3"), as for the ordinary <kpoints>. */
  meshGeneration?: { param: string; divisions: string };
  /** Leave out the <varray name="kpointlist"> (a hostile file). */
  omitKpointList?: boolean;
  /** Extra <set comment="kpoint"> sets after the listed k-points (more rows than the list declares). */
  extraKpointSets?: number;
  /** The efermi written in a <dos_kpoints_opt> after the block (none when absent). */
  dosEfermi?: number;
  /** A <projected_kpoints_opt> with eigenvalues shifted by this many eV (a trap for readers). */
  projectedShift?: number;
}

const f = (x: number): string => fortranF(x, 16, 8);

function eigenvalueArray(spec: KpointsOptSpec, shift: number, indent: string): string[] {
  const out = ['<eigenvalues>', ' <array>', '  <dimension dim="1">band</dimension>', '  <dimension dim="2">kpoint</dimension>'];
  out.push('  <dimension dim="3">spin</dimension>', '  <field>eigene</field>');
  if (spec.occupations) out.push('  <field>occ</field>');
  out.push('  <set>');
  const nk = spec.kpoints.length + (spec.extraKpointSets ?? 0);
  for (let s = 0; s < spec.nSpin; s++) {
    out.push(`   <set comment="spin ${s + 1}">`);
    for (let k = 0; k < nk; k++) {
      out.push(`    <set comment="kpoint ${k + 1}">`);
      const kk = Math.min(k, spec.kpoints.length - 1);
      const occ = spec.occupations?.(s, kk);
      spec.energies(s, kk).forEach((e, b) => out.push(`     <r>${fortranF(e + shift, 10, 4)}${occ ? fortranF(occ[b]!, 10, 4) : ''} </r>`));
      out.push('    </set>');
    }
    out.push('   </set>');
  }
  out.push('  </set>', ' </array>', '</eigenvalues>');
  return out.map((l) => indent + l);
}

/** The block's text (lines indented for a place directly inside <calculation>). */
export function kpointsOptBlock(spec: KpointsOptSpec): string {
  const out = ['  <eigenvalues_kpoints_opt comment="kpoints_opt">', '   <kpoints>'];
  if (spec.generation) {
    out.push(
      '    <generation param="listgenerated">',
      `     <i name="divisions" type="int">${String(spec.generation.divisions).padStart(8)} </i>`,
    );
    for (const e of spec.generation.ends) out.push(`     <v>${e.map(f).join('')} </v>`);
    out.push('    </generation>');
  }
  if (spec.meshGeneration) {
    const g = spec.meshGeneration;
    out.push(`    <generation param="${g.param}">`, `     <v type="int" name="divisions">${g.divisions} </v>`);
    out.push(`     <v name="usershift">${[0, 0, 0].map(f).join('')} </v>`, '    </generation>');
  }
  if (!spec.omitKpointList) {
    out.push('    <varray name="kpointlist" >');
    for (const k of spec.kpoints) out.push(`     <v>${k.map(f).join('')} </v>`);
    out.push('    </varray>');
  }
  out.push('    <varray name="weights" >');
  for (let i = 0; i < spec.kpoints.length; i++) out.push(`     <v>${f(0)} </v>`);
  out.push('    </varray>', '   </kpoints>');
  out.push(...eigenvalueArray(spec, 0, '   '));
  out.push('  </eigenvalues_kpoints_opt>');
  if (spec.projectedShift !== undefined) {
    out.push('  <projected_kpoints_opt>', ...eigenvalueArray(spec, spec.projectedShift, '   '), '  </projected_kpoints_opt>');
  }
  if (spec.dosEfermi !== undefined)
    out.push('  <dos_kpoints_opt>', `   <i name="efermi">${f(spec.dosEfermi)} </i>`, '  </dos_kpoints_opt>');
  return out.join('\n');
}

/**
 * `vasprun` (from writeVasprun) with the block placed inside its last <calculation>: after the ordinary
 * <eigenvalues> (before <dos>) or before them.
 */
export function withKpointsOpt(vasprun: string, block: string, where: 'after' | 'before'): string {
  const anchor = where === 'after' ? '\n  <dos>' : '\n  <eigenvalues>';
  const at = vasprun.lastIndexOf(anchor);
  if (at < 0) throw new Error(`no ${anchor.trim()} in the vasprun.xml to place the block at`);
  return `${vasprun.slice(0, at)}\n${block}${vasprun.slice(at)}`;
}
