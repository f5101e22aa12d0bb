import assert from 'node:assert/strict';
import { averagedFromPrincipal, conductivityMass, densityOfStatesMass, multiBandDosMass } from '../../../src/core/analysis/averagedMasses';

describe('averaged masses', () => {
  it('Si electrons: m_l = 0.98, m_t = 0.19, N_v = 6 give m_dos ≈ 1.08 and m_c ≈ 0.26 (Sze & Ng, memory)', () => {
    // Handbook values recalled from memory (Sze & Ng, Physics of Semiconductor Devices, 3rd ed., appendix).
    assert.ok(Math.abs(densityOfStatesMass([0.98, 0.19, 0.19], 6) - 1.08) < 0.01);
    assert.ok(Math.abs(conductivityMass([0.98, 0.19, 0.19]) - 0.26) < 0.005);
  });

  it('an isotropic single valley: both averages equal the mass (analytic)', () => {
    assert.ok(Math.abs(densityOfStatesMass([0.067, 0.067, 0.067], 1) - 0.067) < 1e-15);
    assert.ok(Math.abs(conductivityMass([0.067, 0.067, 0.067]) - 0.067) < 1e-15);
  });

  it('combines hole bands as (Σ m_i^(3/2))^(2/3) (physics.md step 9)', () => {
    // Two equal bands of mass m: (2 m^(3/2))^(2/3) = 2^(2/3) m (analytic).
    assert.ok(Math.abs(multiBandDosMass([0.5, 0.5]) - 2 ** (2 / 3) * 0.5) < 1e-15);
    // Si heavy and light holes 0.49 and 0.16 (memory, Sze & Ng): (0.49^1.5 + 0.16^1.5)^(2/3) ≈ 0.55.
    assert.ok(Math.abs(multiBandDosMass([0.49, 0.16]) - 0.55) < 0.01);
  });

  it('refuses a saddle point and states its inputs otherwise', () => {
    const saddle = averagedFromPrincipal([0.2, 0.3, -0.5], 1, 'fitted mass tensor');
    assert.equal(saddle.dosMass, null);
    assert.match(saddle.note, /both signs/);
    const holes = averagedFromPrincipal([-0.3, -0.3, -0.3], null, 'fitted mass tensor');
    assert.ok(Math.abs(holes.dosMass! - 0.3) < 1e-12); // isotropic, N_v taken as 1: analytic
    assert.match(holes.note, /N_v unknown/);
    assert.match(holes.note, /hole/);
  });
});
