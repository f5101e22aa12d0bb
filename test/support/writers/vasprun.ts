/**
 * Writer for vasprun.xml from a model band structure, with the elements VASP 5.4/6 writes around the band
 * data (generator, incar, kpoints with a listgenerated generation, parameters, atominfo, structures,
 * calculation/eigenvalues with energies in f10.4, dos/efermi). Numbers in VASP's fixed formats.
 */
import type { BandStructure, Structure } from '../../../src/core/model';
import { fortranF } from './vasp';

export interface VasprunOptions {
  structure?: Structure;
  /** Points per segment of the line-mode generation and its corner list (fractional), when a path. */
  generation?: { divisions: number; ends: number[][] };
  /** Stop writing inside the eigenvalues (a running job): the number of k-points of spin 1 written. */
  truncateInEigenvaluesAfterK?: number;
  /** Write the eigenvalues twice (two ionic steps), the first shifted by this many eV. */
  earlierStepShift?: number;
  /** Add a <projected> block whose eigenvalues differ (a trap for readers). */
  projected?: boolean;
  /** Add a DOCTYPE with an entity (hostile file). */
  doctype?: boolean;
  /** SYSTEM name (default "model"; `modelSystemName(...)` marks model data). */
  system?: string;
  /** Extra tags as the user set them (written into <incar>) and as VASP used them (into <parameters>). */
  incarTags?: Record<string, string>;
  parameterTags?: Record<string, string>;
  /** Write no <parameters> block. */
  noParameters?: boolean;
  /** An automatic mesh's <generation> (param "Gamma" or "Monkhorst-Pack"), as VASP 5.4/6 writes it (memory). */
  meshGeneration?: { param: string; divisions: string; usershift?: string };
}

const f = (x: number, w = 16, d = 8): string => fortranF(x, w, d);

export function writeVasprun(bs: BandStructure, opts: VasprunOptions = {}): string {
  const st = opts.structure ?? bs.structure ?? { lattice: bs.lattice!, species: ['Si'], positions: new Float64Array([0, 0, 0]) };
  const out: string[] = [];
  out.push('<?xml version="1.0" encoding="ISO-8859-1"?>');
  if (opts.doctype) out.push('<!DOCTYPE modeling [<!ENTITY a "aaaaaaaaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;">]>');
  out.push('<modeling>');
  out.push(' <generator>', '  <i name="program" type="string">vasp </i>', '  <i name="version" type="string">6.4.2  </i>', ' </generator>');
  const system = opts.system ?? 'model';
  const tag = (k: string, v: string): string =>
    /^[.]?[TF]/i.test(v) && v.trim().length <= 7
      ? `<i type="logical" name="${k}"> ${v} </i>`
      : /^[A-Za-z-]/.test(v)
        ? `<i type="string" name="${k}">${v}</i>`
        : `<i name="${k}">${v}</i>`;
  out.push(' <incar>', `  <i type="string" name="SYSTEM">${system}</i>`, `  <i name="ISPIN">      ${bs.nSpin}</i>`);
  if (bs.spinorbit) out.push('  <i type="logical" name="LSORBIT"> T  </i>');
  for (const [k, v] of Object.entries(opts.incarTags ?? {})) out.push(`  ${tag(k, v)}`);
  out.push(' </incar>');
  out.push(' <kpoints>');
  if (opts.generation) {
    out.push(
      '  <generation param="listgenerated">',
      `   <i name="divisions" type="int">${String(opts.generation.divisions).padStart(8)} </i>`,
    );
    for (const e of opts.generation.ends) out.push(`   <v>${e.map((x) => f(x)).join('')} </v>`);
    out.push('  </generation>');
  }
  if (opts.meshGeneration) {
    const g = opts.meshGeneration;
    out.push(
      `  <generation param="${g.param}">`,
      `   <v type="int" name="divisions">${g.divisions} </v>`,
      `   <v name="usershift">${g.usershift ?? '      0.00000000      0.00000000      0.00000000'} </v>`,
      '   <v name="genvec1">      0.08333333      0.00000000      0.00000000 </v>',
      '   <v name="genvec2">      0.00000000      0.08333333      0.00000000 </v>',
      '   <v name="genvec3">      0.00000000      0.00000000      0.08333333 </v>',
      '   <v name="shift">      0.00000000      0.00000000      0.00000000 </v>',
      '  </generation>',
    );
  }
  out.push('  <varray name="kpointlist" >');
  for (let k = 0; k < bs.nk; k++) out.push(`   <v>${[0, 1, 2].map((j) => f(bs.kpoints[3 * k + j]!)).join('')} </v>`);
  out.push('  </varray>', '  <varray name="weights" >');
  for (let k = 0; k < bs.nk; k++) out.push(`   <v>${f(bs.weights ? bs.weights[k]! : 1 / bs.nk)} </v>`);
  out.push('  </varray>', ' </kpoints>');
  if (!opts.noParameters) {
    out.push(
      ' <parameters>',
      '  <separator name="general" >',
      `   <i type="string" name="SYSTEM">${system}</i>`,
      '  </separator>',
      '  <separator name="electronic" >',
    );
    out.push(`   <i name="NELECT">${f(bs.electrons ?? 0)}</i>`, `   <i type="int" name="NBANDS">${String(bs.nBands).padStart(6)}</i>`);
    out.push('   <separator name="electronic spin" >', `    <i type="int" name="ISPIN">     ${bs.nSpin}</i>`);
    out.push(
      `    <i type="logical" name="LNONCOLLINEAR"> ${bs.spinorbit ? 'T' : 'F'}  </i>`,
      `    <i type="logical" name="LSORBIT"> ${bs.spinorbit ? 'T' : 'F'}  </i>`,
    );
    out.push('   </separator>', '   <separator name="electronic exchange-correlation" >');
    for (const [k, v] of Object.entries(opts.parameterTags ?? {})) out.push(`    ${tag(k, v)}`);
    out.push('   </separator>', '  </separator>', ' </parameters>');
  }
  out.push(
    ' <atominfo>',
    `  <atoms>${String(st.species.length).padStart(8)} </atoms>`,
    '  <types>       1 </types>',
    '  <array name="atoms" >',
  );
  out.push(
    '   <dimension dim="1">ion</dimension>',
    '   <field type="string">element</field>',
    '   <field type="int">atomtype</field>',
    '   <set>',
  );
  for (const s of st.species) out.push(`    <rc><c>${s.padEnd(2)}</c><c>   1</c></rc>`);
  out.push('   </set>', '  </array>', ' </atominfo>');
  const structure = (name: string | null): void => {
    out.push(name ? ` <structure name="${name}" >` : '  <structure>');
    out.push('  <crystal>', '   <varray name="basis" >');
    for (const r of st.lattice) out.push(`    <v>${r.map((x) => f(x)).join('')} </v>`);
    out.push('   </varray>', '   <i name="volume">     40.00000000 </i>', '  </crystal>', '  <varray name="positions" >');
    for (let i = 0; i < st.species.length; i++) out.push(`   <v>${[0, 1, 2].map((j) => f(st.positions[3 * i + j]!)).join('')} </v>`);
    out.push('  </varray>', ' </structure>');
  };
  structure('initialpos');
  const eigen = (shift: number, truncateAfter?: number): boolean => {
    out.push('  <eigenvalues>', '   <array>', '    <dimension dim="1">band</dimension>', '    <dimension dim="2">kpoint</dimension>');
    out.push('    <dimension dim="3">spin</dimension>', '    <field>eigene</field>', '    <field>occ</field>', '    <set>');
    for (let s = 0; s < bs.nSpin; s++) {
      out.push(`     <set comment="spin ${s + 1}">`);
      for (let k = 0; k < bs.nk; k++) {
        if (truncateAfter !== undefined && k >= truncateAfter) return false;
        out.push(`      <set comment="kpoint ${k + 1}">`);
        for (let b = 0; b < bs.nBands; b++) {
          const e = bs.energies[s]![k * bs.nBands + b]! + shift;
          const o = bs.occupations ? bs.occupations[s]![k * bs.nBands + b]! : 0;
          out.push(`       <r>${fortranF(e, 10, 4)}${fortranF(o, 10, 4)} </r>`);
        }
        out.push('      </set>');
      }
      out.push('     </set>');
    }
    out.push('    </set>', '   </array>', '  </eigenvalues>');
    return true;
  };
  if (opts.earlierStepShift !== undefined) {
    out.push(' <calculation>');
    eigen(opts.earlierStepShift);
    out.push(' </calculation>');
  }
  out.push(' <calculation>');
  structure(null);
  if (!eigen(0, opts.truncateInEigenvaluesAfterK)) return out.join('\n') + '\n';
  if (opts.projected) {
    out.push('  <projected>');
    const saved = out.length;
    eigen(100);
    for (let i = saved; i < out.length; i++) out[i] = '  ' + out[i];
    out.push('  </projected>');
  }
  out.push('  <dos>', `   <i name="efermi">${f(bs.fermiEnergy ?? 0)} </i>`, '  </dos>');
  out.push(' </calculation>');
  structure('finalpos');
  out.push('</modeling>');
  return out.join('\n') + '\n';
}
