import assert from 'node:assert/strict';
import fc from 'fast-check';
import { analyzeBandStructure } from '../../../src/core/analysis/analyze';
import type { BandStructure, ExtremumReport, Vec3 } from '../../../src/core/model';
import { cosineBand, cubicLattice, orthorhombicLattice, pathModel, rotateLattice, rotation, type PathLeg } from '../../support/models';

// Properties a mass must have whatever the bookkeeping (physics: a mass is a property of E(k) at the
// extremum, not of the path order, the energy zero, the choice among equivalent directions, or the
// orientation of the crystal in the cartesian frame). Fixed seed, bounded runs.
const RUNS = { seed: 424242, numRuns: 12 };

const G: PathLeg = { label: 'Γ', k: [0, 0, 0] };
const X: PathLeg = { label: 'X', k: [0.5, 0, 0] };
const Y: PathLeg = { label: 'Y', k: [0, 0.5, 0] };
const Z: PathLeg = { label: 'Z', k: [0, 0, 0.5] };
const S: PathLeg = { label: 'S', k: [0.5, 0.5, 0] };

const hopping = fc.tuple(
  fc.double({ min: 0.2, max: 1.5, noNaN: true }),
  fc.double({ min: 0.2, max: 1.5, noNaN: true }),
  fc.double({ min: 0.2, max: 1.5, noNaN: true }),
);
const lengths = fc.tuple(
  fc.double({ min: 2.5, max: 6, noNaN: true }),
  fc.double({ min: 2.5, max: 6, noNaN: true }),
  fc.double({ min: 2.5, max: 6, noNaN: true }),
);

function model(a: Vec3, t: Vec3, legs: PathLeg[][], lattice = orthorhombicLattice(...a)): BandStructure {
  return pathModel({ lattice, bands: [cosineBand(-1, [-0.3, -0.4, -0.5]), cosineBand(1, t)], electrons: 2, legs, pointsPerSegment: 31 });
}

function massesByTowards(e: ExtremumReport): Map<string, number> {
  return new Map(e.masses.map((m) => [m.towards, m.mass]));
}

function edge(bs: BandStructure, kind: 'cbm' | 'vbm', shift = 0): ExtremumReport {
  if (shift) bs.energies = bs.energies.map((e) => e.map((x) => x + shift));
  const r = analyzeBandStructure(bs);
  return r.extrema.find((e) => e.kind === kind)!;
}

const close = (a: number, b: number, rel = 1e-9): boolean => Math.abs(a - b) <= rel * Math.max(1, Math.abs(a), Math.abs(b));

/** The same path walked backwards: k-points and labels in reverse order. */
function reversed(bs: BandStructure): BandStructure {
  const nk = bs.nk;
  const nb = bs.nBands;
  const k = new Float64Array(nk * 3);
  const e = new Float64Array(nk * nb);
  for (let i = 0; i < nk; i++) {
    const j = nk - 1 - i;
    k.set(bs.kpoints.subarray(3 * j, 3 * j + 3), 3 * i);
    e.set(bs.energies[0]!.subarray(j * nb, j * nb + nb), i * nb);
  }
  return { ...bs, kpoints: k, energies: [e], labels: bs.labels.map((l) => ({ index: nk - 1 - l.index, label: l.label })).reverse() };
}

describe('mass invariances (fast-check)', () => {
  it('reversing the path leaves every directional mass unchanged', () => {
    fc.assert(
      fc.property(lengths, hopping, (a, t) => {
        const bs = model(a, t, [[X, G, Y, S, G, Z]]);
        for (const kind of ['cbm', 'vbm'] as const) {
          const f = massesByTowards(edge(bs, kind));
          const b = massesByTowards(edge(reversed(bs), kind));
          assert.deepEqual([...f.keys()].sort(), [...b.keys()].sort());
          for (const [k, m] of f) assert.ok(close(m, b.get(k)!), `${kind} ${k}: ${m} vs ${b.get(k)}`);
        }
      }),
      RUNS,
    );
  });

  it('shifting all energies leaves masses unchanged and moves the edges by the shift', () => {
    fc.assert(
      fc.property(lengths, hopping, fc.double({ min: -20, max: 20, noNaN: true }), (a, t, shift) => {
        const e0 = edge(model(a, t, [[G, X, S, G, Z]]), 'cbm');
        const e1 = edge(model(a, t, [[G, X, S, G, Z]]), 'cbm', shift);
        assert.ok(Math.abs(e1.eV - e0.eV - shift) < 1e-9);
        const m0 = massesByTowards(e0);
        for (const [k, m] of massesByTowards(e1)) assert.ok(close(m, m0.get(k)!, 1e-6), `${k}: ${m} vs ${m0.get(k)}`);
      }),
      RUNS,
    );
  });

  it('permuting equivalent directions of a cubic crystal gives equal masses', () => {
    fc.assert(
      fc.property(fc.double({ min: 2.5, max: 6, noNaN: true }), fc.double({ min: 0.2, max: 1.5, noNaN: true }), (a, t) => {
        const lat = cubicLattice(a);
        const along = (end: PathLeg): number => edge(model([a, a, a], [t, t, t], [[G, end]], lat), 'cbm').masses[0]!.mass;
        const mx = along(X);
        assert.ok(close(mx, along(Y)));
        assert.ok(close(mx, along(Z)));
      }),
      RUNS,
    );
  });

  it('rotating the crystal leaves masses unchanged and rotates their directions', () => {
    fc.assert(
      fc.property(
        lengths,
        hopping,
        fc.tuple(
          fc.double({ min: -1, max: 1, noNaN: true }),
          fc.double({ min: -1, max: 1, noNaN: true }),
          fc.double({ min: 0.1, max: 1, noNaN: true }),
        ),
        fc.double({ min: -Math.PI, max: Math.PI, noNaN: true }),
        (a, t, axis, angle) => {
          const q = rotation(axis, angle);
          const plain = edge(model(a, t, [[G, X, S, G, Z]]), 'cbm');
          const turned = edge(model(a, t, [[G, X, S, G, Z]], rotateLattice(orthorhombicLattice(...a), q)), 'cbm');
          for (const m of plain.masses) {
            const r = turned.masses.find((x) => x.towards === m.towards)!;
            assert.ok(close(m.mass, r.mass, 1e-8), `${m.towards}: ${m.mass} vs ${r.mass}`);
            const d = m.direction;
            const qd: Vec3 = [0, 1, 2].map((i) => q[i]![0] * d[0] + q[i]![1] * d[1] + q[i]![2] * d[2]) as Vec3;
            assert.ok(Math.hypot(qd[0] - r.direction[0], qd[1] - r.direction[1], qd[2] - r.direction[2]) < 1e-9);
          }
        },
      ),
      RUNS,
    );
  });
});
