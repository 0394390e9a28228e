import { describe, expect, it } from 'vitest';
import { conduitConductivityKgMPerSPerPa, segmentConductanceKgPerSPerPa } from '../../core/hydraulics/conductance.js';

// Water at 20 °C rounded as in hand calculations: ρ = 998.2 kg m⁻³, η = 1.0016 mPa s
// (IAPWS 2008 / Kell 1975 values at 20 °C, rounded).
const water = { densityKgM3: 998.2, viscosityPaS: 1.0016e-3 };

describe('conduitConductivityKgMPerSPerPa', () => {
  it('follows Hagen–Poiseuille: k_h = π ρ D⁴ / (128 η), growing with the fourth power of D', () => {
    // Hagen–Poiseuille for a circular tube; doubling D multiplies k_h by 2⁴ = 16 (textbook law).
    const k = conduitConductivityKgMPerSPerPa(50e-6, water);
    expect(conduitConductivityKgMPerSPerPa(100e-6, water) / k).toBeCloseTo(16, 12);
  });
});

describe('segmentConductanceKgPerSPerPa', () => {
  it('matches a hand calculation for a 1 m pipe of 1000 conduits of 50 µm without end walls', () => {
    // Hand calculation: 1000 · π · 998.2 · (50e-6 m)⁴ / (128 · 1.0016e-3 Pa s) / 1 m
    //   = 1000 · 3135.93 · 6.25e-18 / 0.128205 = 1.52877e-10 kg s⁻¹ Pa⁻¹ (= 1.52877e-4 per MPa).
    expect(segmentConductanceKgPerSPerPa(50e-6, 1000, 1, 0, water)).toBeCloseTo(1.52877e-10, 14);
  });

  it('scales the lumen conductance by (1 − end-wall share) and by 1/length', () => {
    // End walls carrying a share f of the total resistance leave (1 − f) of the lumen conductance
    // (Sperry, Hacke & Pittermann 2006 Am. J. Bot. 93:1490 report f ≈ 0.56–0.64); resistances
    // of pieces in series add, so conductance ∝ 1/L (Ohm's-law analogy).
    const lumen = segmentConductanceKgPerSPerPa(50e-6, 1000, 1, 0, water);
    expect(segmentConductanceKgPerSPerPa(50e-6, 1000, 2, 0.6, water)).toBeCloseTo((lumen * 0.4) / 2, 20);
  });
});
