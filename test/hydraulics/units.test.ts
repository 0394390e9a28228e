import { describe, expect, it } from 'vitest';
import { celsiusToKelvin, mmolPerSToKgPerS, paToMpa, perPaToPerMpa } from '../../core/hydraulics/units.js';

describe('perPaToPerMpa', () => {
  it('multiplies a conductance per pascal by 10⁶ to get it per megapascal', () => {
    // SI prefixes (BIPM SI brochure): 1 MPa = 10⁶ Pa, so 1 kg s⁻¹ Pa⁻¹ = 10⁶ kg s⁻¹ MPa⁻¹.
    expect(perPaToPerMpa(2.5e-10)).toBeCloseTo(2.5e-4, 18);
  });
});

describe('paToMpa', () => {
  it('turns 101 325 Pa (one standard atmosphere) into 0.101325 MPa', () => {
    // Standard atmosphere = 101 325 Pa (ISO 2533).
    expect(paToMpa(101325)).toBeCloseTo(0.101325, 12);
  });
});

describe('celsiusToKelvin', () => {
  it('turns 25 °C into 298.15 K', () => {
    // ITS-90 / SI: T/K = t/°C + 273.15.
    expect(celsiusToKelvin(25)).toBeCloseTo(298.15, 12);
  });
});

describe('mmolPerSToKgPerS', () => {
  it('turns 1 mol of water per second into 18.015 g per second', () => {
    // IUPAC atomic weights: M(H₂O) = 2 × 1.008 + 15.999 = 18.015 g mol⁻¹.
    expect(mmolPerSToKgPerS(1000)).toBeCloseTo(0.018015, 9);
  });
});
