/**
 * JSON Lines files written by the batch commands (`analyze --jsonl`, `check --jsonl`), read back so that
 * `compare` and `check` can merge the shards of a job array: records from every file are put in path order
 * (the order one machine writes them in), a run that appears twice is refused, and every record is checked
 * before use (the files may come from anywhere).
 */
import type { Mat3 } from '../../core/model';
import type { FileAccessor } from '../../core/io/fileAccessor';
import { ValleyscopeError } from '../../core/errors';
import type { RunInput } from '../../core/compare/compareRuns';
import { parseAnnotations } from '../../core/annotations/parseAnnotations';
import { serializeAnnotations } from '../../core/annotations/serializeAnnotations';
import type { AnnotationChange } from '../../core/annotations/compareAnnotations';
import type { FileOutcome } from '../commands/check';
import { comparePaths } from './pathOrder';
import { JsonShape, reportFromJson } from './reportFromJson';

/** A JSON Lines file is named *.jsonl. */
export function isJsonLinesPath(path: string): boolean {
  return /\.jsonl$/i.test(path);
}

/** JSON Lines files larger than this are refused (bytes): 1 GiB holds hundreds of thousands of runs. */
export const MAX_JSONL_BYTES = 1024 * 1024 * 1024;

export interface JsonRecord {
  path: string;
  /** "file:line" of the record, for messages. */
  where: string;
  value: Record<string, unknown>;
}

export async function readJsonLines(fs: FileAccessor, files: readonly string[]): Promise<JsonRecord[]> {
  const out: JsonRecord[] = [];
  const seen = new Map<string, string>();
  for (const file of files) {
    const st = await fs.stat(file);
    if (!st) throw new ValleyscopeError(`${file}: no such file`);
    if (st.type !== 'file') throw new ValleyscopeError(`${file} is not a file of JSON Lines`);
    if (st.size > MAX_JSONL_BYTES)
      throw new ValleyscopeError(
        `${file}: ${(st.size / 2 ** 20).toFixed(0)} MiB is more than the ${MAX_JSONL_BYTES / 2 ** 20} MiB a JSON Lines file may hold`,
      );
    const text = new TextDecoder('utf-8', { fatal: false }).decode(await fs.readFile(file));
    const lines = text.split('\n');
    for (let i = 0; i < lines.length; i++) {
      const line = lines[i]!.trim();
      if (line === '') continue;
      const where = `${file}:${i + 1}`;
      let v: unknown;
      try {
        v = JSON.parse(line);
      } catch {
        throw new ValleyscopeError(`${where}: not a JSON object (a line cut short, or not written by valleyscope --jsonl)`);
      }
      const c = new JsonShape(where);
      const value = c.obj(v, 'record');
      const path = c.str(value.path, 'path');
      const before = seen.get(path);
      if (before !== undefined)
        throw new ValleyscopeError(`${where}: the run ${path} was already given at ${before}; were shards merged twice?`);
      seen.set(path, where);
      out.push({ path, where, value });
    }
  }
  return out.sort((a, b) => comparePaths(a.path, b.path));
}

/** Comparison inputs from `analyze --jsonl` records; a record of a failed run is left out with a note. */
export function runsFromRecords(records: readonly JsonRecord[]): { runs: RunInput[]; notes: string[] } {
  const runs: RunInput[] = [];
  const notes: string[] = [];
  for (const r of records) {
    const c = new JsonShape(r.where);
    if (r.value.error !== undefined) {
      notes.push(`${r.path}: left out of the comparison: ${c.str(r.value.error, 'error')}`);
      continue;
    }
    if (r.value.extrema === undefined) {
      throw new ValleyscopeError(`${r.where}: not a record of "analyze --jsonl" (no "extrema"); compare takes the JSON Lines of analyze`);
    }
    const lattice: Mat3 | null =
      r.value.lattice === undefined || r.value.lattice === null ? null : c.finiteMat3(r.value.lattice, 'lattice');
    const rot = r.value.rotations;
    const rotations: Mat3[] | null =
      rot === undefined || rot === null ? null : c.arr(rot, 'rotations').map((m, i) => c.finiteMat3(m, `rotations[${i}]`));
    runs.push({ name: r.path, report: reportFromJson(r.value, r.where), lattice, rotations, origin: 'data' });
  }
  return { runs, notes };
}

/** The JSON Lines record of one checked annotations file. */
export function checkRecord(o: FileOutcome): Record<string, unknown> {
  const status =
    o.error !== null
      ? 'error'
      : o.result.ok
        ? 'ok'
        : [o.result.stale.length ? 'stale' : '', o.result.drifted.length ? 'drifted' : ''].filter(Boolean).join('+');
  return {
    path: o.file,
    status,
    error: o.error,
    stale: o.result?.stale ?? [],
    drifted: o.result?.drifted ?? [],
    annotations: o.doc === null ? null : (JSON.parse(serializeAnnotations(o.doc)) as unknown),
  };
}

const CHANGE_SCOPES = new Set(['source', 'settings', 'gap', 'entry']);

function change(c: JsonShape, v: unknown, f: string): AnnotationChange {
  const o = c.obj(v, f);
  const scope = c.str(o.scope, `${f}.scope`);
  if (!CHANGE_SCOPES.has(scope)) c.fail(`${f}.scope`, 'one of source, settings, gap, entry');
  c.str(o.subject, `${f}.subject`);
  c.str(o.kind, `${f}.kind`);
  c.str(o.quantity, `${f}.quantity`);
  c.strOrNull(o.before ?? null, `${f}.before`);
  c.strOrNull(o.after ?? null, `${f}.after`);
  c.str(o.message, `${f}.message`);
  return o as unknown as AnnotationChange;
}

/** Check outcomes from `check --jsonl` records (the annotations document is parsed again, as from a file). */
export function outcomesFromRecords(records: readonly JsonRecord[]): FileOutcome[] {
  return records.map((r): FileOutcome => {
    const c = new JsonShape(r.where);
    const v = r.value;
    if (v.status === undefined || v.annotations === undefined) {
      throw new ValleyscopeError(
        `${r.where}: not a record of "check --jsonl" (no "status" or "annotations"); check takes the JSON Lines of check`,
      );
    }
    const doc = v.annotations === null ? null : parseAnnotations(JSON.stringify(c.obj(v.annotations, 'annotations')), r.path);
    if (v.error !== null && v.error !== undefined) return { file: r.path, doc, result: null, error: c.str(v.error, 'error') };
    if (doc === null) return c.fail('annotations', 'the annotations document when there is no error');
    const stale = c.arr(v.stale, 'stale').map((x, i) => change(c, x, `stale[${i}]`));
    const drifted = c.arr(v.drifted, 'drifted').map((x, i) => change(c, x, `drifted[${i}]`));
    return { file: r.path, doc, result: { ok: stale.length === 0 && drifted.length === 0, stale, drifted }, error: null };
  });
}
