import type { WaterProperties } from './water.js';

/**
 * Hagen–Poiseuille conductivity of one conduit of diameter D: k_h = π ρ D⁴ / (128 η).
 * @param diameterM conduit diameter, m
 * @returns kg m s⁻¹ Pa⁻¹ (mass flow × length per pressure difference)
 */
export function conduitConductivityKgMPerSPerPa(diameterM: number, water: Pick<WaterProperties, 'densityKgM3' | 'viscosityPaS'>): number {
  return (Math.PI * water.densityKgM3 * diameterM ** 4) / (128 * water.viscosityPaS);
}

/**
 * Conductance of one segment: N conduits of D_h in parallel (N·D_h⁴ = Σ D⁴ by the definition of
 * D_h), lumen conductivity reduced by the end-wall share f of total resistance (total resistance
 * = lumen resistance / (1 − f); Sperry, Hacke & Pittermann 2006 Am. J. Bot. 93:1490), over length L.
 * @param diameterM D_h, m
 * @param count number of conduits
 * @param lengthM segment length, m
 * @param endWallFraction f in [0, 1)
 * @returns kg s⁻¹ Pa⁻¹
 */
export function segmentConductanceKgPerSPerPa(
  diameterM: number,
  count: number,
  lengthM: number,
  endWallFraction: number,
  water: Pick<WaterProperties, 'densityKgM3' | 'viscosityPaS'>,
): number {
  return (count * conduitConductivityKgMPerSPerPa(diameterM, water) * (1 - endWallFraction)) / lengthM;
}
