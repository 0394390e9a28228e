import { XylemapError } from '../util/errors.js';
import { celsiusToKelvin, PA_PER_MPA, STANDARD_GRAVITY_M_S2 } from './units.js';

/**
 * Properties of liquid water that set xylem flow: dynamic viscosity (IAPWS 2008) and density
 * (Kell 1975). Xylem sap is treated as pure water; the small effect of negative pressure on
 * density (compressibility ≈ 4.6·10⁻¹⁰ Pa⁻¹, i.e. < 0.1 % at −2 MPa) is neglected.
 */

// IAPWS 2008 release on the viscosity of ordinary water (Huber et al. 2009, J. Phys. Chem. Ref.
// Data 38:101), eqs. (10)–(12), Tables 1–2. Reduced by T* = 647.096 K, ρ* = 322.0 kg m⁻³, μ* = 1 µPa s.
const T_STAR_K = 647.096;
const RHO_STAR_KG_M3 = 322.0;
const MU_STAR_PA_S = 1.0e-6;
const H0 = [1.67752, 2.20462, 0.6366564, -0.241605];
/** H_ij as [i, j, value] (Table 2; i runs over (1/T̄ − 1)^i, j over (ρ̄ − 1)^j). */
const H1: ReadonlyArray<readonly [number, number, number]> = [
  [0, 0, 5.20094e-1],
  [1, 0, 8.50895e-2],
  [2, 0, -1.08374],
  [3, 0, -2.89555e-1],
  [0, 1, 2.22531e-1],
  [1, 1, 9.99115e-1],
  [2, 1, 1.88797],
  [3, 1, 1.26613],
  [5, 1, 1.20573e-1],
  [0, 2, -2.81378e-1],
  [1, 2, -9.06851e-1],
  [2, 2, -7.72479e-1],
  [3, 2, -4.89837e-1],
  [4, 2, -2.5704e-1],
  [0, 3, 1.61913e-1],
  [1, 3, 2.57399e-1],
  [0, 4, -3.25372e-2],
  [3, 4, 6.98452e-2],
  [4, 5, 8.72102e-3],
  [3, 6, -4.35673e-3],
  [5, 6, -5.93264e-4],
];

/**
 * Dynamic viscosity of water by the IAPWS 2008 formulation, without the critical enhancement
 * (μ₂ = 1, which the release allows everywhere except very near the critical point).
 * @param temperatureK temperature, K
 * @param densityKgM3 density, kg m⁻³
 * @returns viscosity, Pa s
 */
export function waterViscosityPaS(temperatureK: number, densityKgM3: number): number {
  if (!(temperatureK > 0)) throw new XylemapError(`temperature must be > 0 K, got ${temperatureK}`, { stage: 'hydraulics' });
  if (!(densityKgM3 > 0)) throw new XylemapError(`density must be > 0 kg m⁻³, got ${densityKgM3}`, { stage: 'hydraulics' });
  const t = temperatureK / T_STAR_K;
  const r = densityKgM3 / RHO_STAR_KG_M3;
  let denom = 0;
  for (let i = 0; i < H0.length; i++) denom += H0[i] / t ** i;
  const mu0 = (100 * Math.sqrt(t)) / denom;
  const x = 1 / t - 1;
  const y = r - 1;
  let sum = 0;
  for (const [i, j, h] of H1) sum += h * x ** i * y ** j;
  const mu1 = Math.exp(r * sum);
  return mu0 * mu1 * MU_STAR_PA_S;
}

/**
 * Density of air-free liquid water at 101.325 kPa by Kell's correlation (Kell 1975,
 * J. Chem. Eng. Data 20:97, eq. 16; valid 0–150 °C).
 * @param temperatureC temperature, °C
 * @returns density, kg m⁻³
 */
export function waterDensityKgM3(temperatureC: number): number {
  if (!(temperatureC >= 0 && temperatureC <= 150)) {
    throw new XylemapError(`temperature must be in [0, 150] °C for liquid water, got ${temperatureC}`, { stage: 'hydraulics' });
  }
  const t = temperatureC;
  const num = 999.83952 + 16.945176 * t - 7.9870401e-3 * t ** 2 - 46.170461e-6 * t ** 3 + 105.56302e-9 * t ** 4 - 280.54253e-12 * t ** 5;
  return num / (1 + 16.87985e-3 * t);
}

export interface WaterProperties {
  temperatureC: number;
  densityKgM3: number;
  viscosityPaS: number;
  /** ρ g: the hydrostatic gradient of water potential with height, MPa m⁻¹. */
  gravityGradientMpaPerM: number;
}

/** Density, viscosity and hydrostatic gradient of water at a temperature (°C), near 0.1 MPa. */
export function waterProperties(temperatureC: number): WaterProperties {
  const densityKgM3 = waterDensityKgM3(temperatureC);
  return {
    temperatureC,
    densityKgM3,
    viscosityPaS: waterViscosityPaS(celsiusToKelvin(temperatureC), densityKgM3),
    gravityGradientMpaPerM: (densityKgM3 * STANDARD_GRAVITY_M_S2) / PA_PER_MPA,
  };
}
