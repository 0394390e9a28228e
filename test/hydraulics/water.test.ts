import { describe, expect, it } from 'vitest';
import { waterDensityKgM3, waterProperties, waterViscosityPaS } from '../../core/hydraulics/water.js';

describe('waterViscosityPaS', () => {
  // IAPWS 2008 release on the viscosity of ordinary water, Table 4 (check values for computer
  // programs, μ₂ = 1): T / K, ρ / kg m⁻³, μ / µPa s. Printed to 6 decimals, so compare to 1e-6 µPa s.
  const table4: [number, number, number][] = [
    [298.15, 998, 889.7351],
    [298.15, 1200, 1437.649467],
    [373.15, 1000, 307.883622],
    [433.15, 1, 14.538324],
    [433.15, 1000, 217.685358],
    [873.15, 1, 32.619287],
    [873.15, 100, 35.802262],
    [873.15, 600, 77.430195],
    [1173.15, 1, 44.217245],
    [1173.15, 100, 47.640433],
    [1173.15, 400, 64.154608],
  ];
  it.each(table4)('reproduces the IAPWS 2008 check value at %s K and %s kg/m³', (t, rho, muMicro) => {
    expect(Math.abs(waterViscosityPaS(t, rho) * 1e6 - muMicro)).toBeLessThan(1e-6);
  });

  it('rejects a temperature that is not a positive number, NaN included', () => {
    expect(() => waterViscosityPaS(Number.NaN, 998)).toThrow(/temperature must be > 0 K/);
    expect(() => waterViscosityPaS(298.15, 0)).toThrow(/density must be > 0/);
  });
});

describe('waterDensityKgM3', () => {
  // Density of air-free water at 101.325 kPa (CRC Handbook of Chemistry and Physics, "Properties
  // of water in the range 0–100 °C"; values from memory): Kell's correlation agrees to ~3 ppm.
  const handbook: [number, number][] = [
    [0, 999.8395],
    [4, 999.972],
    [20, 998.2071],
    [25, 997.0479],
    [40, 992.2152],
  ];
  it.each(handbook)('matches the handbook density at %s °C within 1e-5 relative', (t, rho) => {
    expect(Math.abs(waterDensityKgM3(t) - rho) / rho).toBeLessThan(1e-5);
  });

  it('has its maximum near 4 °C', () => {
    // Water is densest at 3.98 °C (CRC Handbook; common knowledge).
    expect(waterDensityKgM3(4)).toBeGreaterThan(waterDensityKgM3(2));
    expect(waterDensityKgM3(4)).toBeGreaterThan(waterDensityKgM3(6));
  });

  it('rejects temperatures outside the liquid range of the correlation', () => {
    expect(() => waterDensityKgM3(-5)).toThrow(/\[0, 150\] °C/);
    expect(() => waterDensityKgM3(Number.NaN)).toThrow(/got NaN/);
  });
});

describe('waterProperties', () => {
  it('gives about 1001.6 µPa s at 20 °C and 0.1 MPa', () => {
    // IAPWS 2008 (Huber et al. 2009 J. Phys. Chem. Ref. Data 38:101): 1001.6 µPa s at 20 °C, 0.1 MPa.
    expect(waterProperties(20).viscosityPaS * 1e6).toBeCloseTo(1001.6, 1);
  });

  it('gives a hydrostatic gradient ρ g of about 0.0098 MPa per metre at 20 °C', () => {
    // 998.2 kg m⁻³ × 9.80665 m s⁻² = 9789 Pa m⁻¹ (standard gravity, 3rd CGPM 1901).
    expect(waterProperties(20).gravityGradientMpaPerM).toBeCloseTo(0.009789, 6);
  });

  it('makes water less viscous when it is warmer', () => {
    // IAPWS 2008: viscosity of liquid water falls monotonically with temperature at 0.1 MPa.
    expect(waterProperties(30).viscosityPaS).toBeLessThan(waterProperties(10).viscosityPaS);
  });
});
