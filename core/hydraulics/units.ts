/**
 * Unit constants of the hydraulics stage. Internally everything is SI (m, Pa, kg, s);
 * conductances are reported per MPa, as plant hydraulics usually does.
 */

/** Pascal per megapascal. */
export const PA_PER_MPA = 1e6;
/** Metres per micrometre. */
export const M_PER_UM = 1e-6;
/** Square metres per square millimetre. */
export const M2_PER_MM2 = 1e-6;
/** Kelvin at 0 °C (ITS-90 definition of the Celsius scale). */
export const KELVIN_AT_0C = 273.15;
/** Standard acceleration of gravity, m s⁻² (3rd CGPM 1901, exact by definition). */
export const STANDARD_GRAVITY_M_S2 = 9.80665;
/** Molar mass of water, kg mol⁻¹ (IUPAC standard atomic weights: 2·1.008 + 15.999 = 18.015 g mol⁻¹). */
export const WATER_MOLAR_MASS_KG_PER_MOL = 18.015e-3;

/** Conductance from kg s⁻¹ Pa⁻¹ to kg s⁻¹ MPa⁻¹. */
export function perPaToPerMpa(valuePerPa: number): number {
  return valuePerPa * PA_PER_MPA;
}

/** Pressure from Pa to MPa. */
export function paToMpa(pa: number): number {
  return pa / PA_PER_MPA;
}

/** Temperature from °C to K. */
export function celsiusToKelvin(tC: number): number {
  return tC + KELVIN_AT_0C;
}

/** Water flux from mmol s⁻¹ to kg s⁻¹. */
export function mmolPerSToKgPerS(mmolPerS: number): number {
  return mmolPerS * 1e-3 * WATER_MOLAR_MASS_KG_PER_MOL;
}
