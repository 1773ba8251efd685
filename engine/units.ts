/**
 * Units: the gravitational constant G in the unit systems simulations commonly use, derived here from
 * defining constants rather than typed in:
 *   G = 6.67430e-11 m³ kg⁻¹ s⁻²            (CODATA 2018, Tiesinga et al. 2021, Rev. Mod. Phys. 93, 025010)
 *   GM☉ = 1.3271244e20 m³ s⁻²              (IAU 2015 Resolution B3, nominal solar mass parameter)
 *   au = 149 597 870 700 m                   (IAU 2012 Resolution B2, exact)
 *   pc = (648 000/π) au                      (IAU 2015 Resolution B2, exact)
 *   Julian year = 365.25 × 86 400 s          (IAU)
 * With a solar mass as the mass unit, G·M☉ is the nominal GM☉ itself, so those presets use GM☉ only;
 * the nominal solar mass in kg is GM☉/G.
 */

/** CODATA 2018 Newtonian constant of gravitation, m³ kg⁻¹ s⁻². */
export const G_SI = 6.6743e-11;
/** IAU 2015 nominal solar mass parameter GM☉, m³ s⁻². */
export const GM_SUN_SI = 1.3271244e20;
/** Astronomical unit in m (IAU 2012 B2, exact). */
export const AU_M = 149_597_870_700;
/** Parsec in m: (648000/π) au (IAU 2015 B2). */
export const PARSEC_M = (648_000 / Math.PI) * AU_M;
/** Julian year in s. */
export const JULIAN_YEAR_S = 365.25 * 86_400;
/** Nominal solar mass in kg, GM☉/G (≈ 1.98841e30). */
export const SOLAR_MASS_KG = GM_SUN_SI / G_SI;

/** A unit system: length, velocity and mass units, and G in them (so time = length/velocity). */
export interface UnitPreset {
  /** Name used on the command line and in stored settings (e.g. 'kpc-kms-msun'). */
  readonly name: string;
  /** Human-readable label, e.g. 'kpc, km/s, M☉'. */
  readonly label: string;
  readonly length: string;
  readonly velocity: string;
  readonly mass: string;
  /** G in length · velocity² / mass. */
  readonly G: number;
}

/** G in units of (length L) (velocity V)² / (mass M) for L in m, V in m/s, M in kg. */
function gIn(lengthM: number, velocityMs: number, massKg: number): number {
  return (G_SI * massKg) / (lengthM * velocityMs * velocityMs);
}

/** G in L V² / (k M☉) for L in m, V in m/s, using GM☉ directly (k solar masses as the mass unit). */
function gSolar(lengthM: number, velocityMs: number, solarMasses: number): number {
  return (GM_SUN_SI * solarMasses) / (lengthM * velocityMs * velocityMs);
}

const KPC_M = 1e3 * PARSEC_M;
const MPC_M = 1e6 * PARSEC_M;

/** The presets, 'G1' (dimensionless G = 1) first. */
export const UNIT_PRESETS: readonly UnitPreset[] = [
  { name: 'G1', label: 'dimensionless, G = 1', length: 'length unit', velocity: 'velocity unit', mass: 'mass unit', G: 1 },
  { name: 'si', label: 'm, m/s, kg', length: 'm', velocity: 'm/s', mass: 'kg', G: gIn(1, 1, 1) },
  { name: 'cgs', label: 'cm, cm/s, g', length: 'cm', velocity: 'cm/s', mass: 'g', G: gIn(1e-2, 1e-2, 1e-3) },
  { name: 'au-yr-msun', label: 'au, au/yr, M☉', length: 'au', velocity: 'au/yr (Julian year)', mass: 'M☉', G: gSolar(AU_M, AU_M / JULIAN_YEAR_S, 1) },
  { name: 'pc-kms-msun', label: 'pc, km/s, M☉', length: 'pc', velocity: 'km/s', mass: 'M☉', G: gSolar(PARSEC_M, 1e3, 1) },
  { name: 'kpc-kms-msun', label: 'kpc, km/s, M☉', length: 'kpc', velocity: 'km/s', mass: 'M☉', G: gSolar(KPC_M, 1e3, 1) },
  { name: 'kpc-kms-1e10msun', label: 'kpc, km/s, 10¹⁰ M☉', length: 'kpc', velocity: 'km/s', mass: '1e10 M☉', G: gSolar(KPC_M, 1e3, 1e10) },
  { name: 'mpc-kms-1e10msun', label: 'Mpc, km/s, 10¹⁰ M☉', length: 'Mpc', velocity: 'km/s', mass: '1e10 M☉', G: gSolar(MPC_M, 1e3, 1e10) },
];

/** The preset called `name` (case-insensitive), or undefined. */
export function unitPresetFind(name: string): UnitPreset | undefined {
  const key = name.trim().toLowerCase();
  return UNIT_PRESETS.find((p) => p.name.toLowerCase() === key);
}

/** G of the preset called `name`; throws a RangeError listing the presets when there is none. */
export function unitsG(name: string): number {
  const p = unitPresetFind(name);
  if (!p) throw new RangeError(`unknown unit preset ${JSON.stringify(name)}; presets: ${UNIT_PRESETS.map((u) => u.name).join(', ')}`);
  return p.G;
}
