/**
 * A large band structure from a textbook model, built inside the page (so 10 million energies need not cross
 * from node): the nearest-neighbour tight-binding chain E(q) = −2t cos(q a), folded into a supercell of M
 * sites (zone folding). Band n of the supercell at reduced wavevector φ = K·Ma ∈ [0, π] is
 *   E_n(φ) = −2t cos(θ_n),  θ_n = (2π⌈n/2⌉ + (n even ? φ : −φ)) / M,
 * which lists the M folded bands in increasing energy. Half filling puts the Fermi level at E = 0.
 * Exported as JavaScript text, evaluated in the page: `(${FOLDED_CHAIN_SOURCE})(nBands, nk)` returns a
 * BandDataMessage of src/protocol/ with ArrayBuffer-encoded arrays (energies as 32-bit floats above 4 million
 * values, as the extension sends them).
 */
export const FOLDED_CHAIN_SOURCE = String.raw`function (nBands, nk) {
  var t = 1.0;            // hopping, eV
  var M = nBands;         // sites per supercell = number of bands
  var aSuper = 2.5 * M;   // supercell length, Å (2.5 Å per site)
  var kMax = Math.PI / aSuper;
  var distance = new Float64Array(nk);
  var kpoints = new Float64Array(nk * 3);
  // Like the extension (src/extension/bandData.ts), energies of very large runs travel as 32-bit floats.
  var f32 = nk * nBands > 4000000;
  var energies = f32 ? new Float32Array(nk * nBands) : new Float64Array(nk * nBands);
  for (var i = 0; i < nk; i++) {
    var phi = Math.PI * i / (nk - 1);
    distance[i] = kMax * i / (nk - 1);
    kpoints[3 * i] = 0.5 * i / (nk - 1);
    for (var n = 0; n < nBands; n++) {
      var theta = (2 * Math.PI * Math.ceil(n / 2) + (n % 2 === 0 ? phi : -phi)) / M;
      energies[i * nBands + n] = -2 * t * Math.cos(theta);
    }
  }
  var report = { file: 'folded-chain', format: 'model', nk: nk, nbands: nBands, nspin: 1, electrons: null, metal: true,
    gap: null, extrema: [], warnings: [], cautions: [] };
  var data = {
    title: 'Tight-binding chain folded into a ' + M + '-site supercell', format: 'model', nk: nk, nBands: nBands, nSpin: 1,
    distance: { dtype: 'f64', length: nk, data: distance.buffer },
    distanceUnits: 'inverse-angstrom',
    kpoints: { dtype: 'f64', length: 3 * nk, data: kpoints.buffer },
    cartesian: null,
    energies: [{ dtype: f32 ? 'f32' : 'f64', length: nk * nBands, data: energies.buffer }],
    ticks: [{ distance: 0, label: 'Γ', kIndex: 0 }, { distance: kMax, label: 'X', kIndex: nk - 1 }],
    segments: [{ start: 0, end: nk - 1, startLabel: 'Γ', endLabel: 'X', afterJump: false }],
    fermiEnergy: 0, vbm_eV: null, cbm_eV: null, report: report, marks: [],
    defaults: { window_meV: 25, method: 'parabola', methods: ['parabola'], energyReference: 'fermi', range_eV: 0.5 },
    partial: false,
  };
  return { type: 'bandData', data: data, environment: { theme: 'dark', readOnly: false, readOnlyReason: null } };
}`;
