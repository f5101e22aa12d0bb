/**
 * The `--json` object of one analysed run, as `analyze --json` prints it and `analyze --jsonl` writes it per line:
 * the report's JSON contract with raw energies, the energy zero the text would use, and each extremum's position
 * on a labelled path line ("0.85 Γ→X"). One function, so a line of a batch equals the single run's output.
 */
import type { BandStructure, Report } from '../core/model';
import { reportToJson } from '../core/report/reportJson';
import { energyZeroOf, type EnergyZeroMode } from '../core/report/energyZero';
import { labelledLines, pathPosition } from '../core/lattice/pathPosition';

export function analysisJson(bs: BandStructure, report: Report, mode: EnergyZeroMode): Record<string, unknown> {
  const zero = energyZeroOf(report, mode, bs.fermiEnergy);
  const lines = labelledLines(bs);
  const json = reportToJson(report);
  json.energyZero = { requested: zero.requested, used: zero.used, eV: zero.eV, reason: zero.reason };
  json.extrema = (json.extrema as Record<string, unknown>[]).map((x, i) => ({
    ...x,
    // A mesh run has no path: its extrema carry their place on a labelled line from Γ themselves.
    pathPosition: pathPosition(report.extrema[i]!.k, lines) ?? report.extrema[i]!.position ?? null,
  }));
  return json;
}
