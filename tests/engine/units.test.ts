/**
 * G presets against values worked out by hand, independently of engine/units.ts: the digits below
 * were computed with `bc -l` at 40 digits from the defining constants (CODATA 2018 G = 6.67430e-11,
 * IAU 2015 nominal GM☉ = 1.3271244e20 m³/s², au = 149597870700 m, pc = 648000/π au, Julian year).
 */
import { describe, expect, it } from 'vitest';
import { AU_M, PARSEC_M, SOLAR_MASS_KG, UNIT_PRESETS, unitPresetFind, unitsG } from '../../engine/units';

/** |a − b| ≤ rel·|b|. */
function expectRel(a: number, b: number, rel: number) {
  expect(Math.abs(a - b), `${a} vs ${b}`).toBeLessThanOrEqual(rel * Math.abs(b));
}

describe('units: derived constants', () => {
  it('parsec = 648000/π au = 3.0856775814913673e16 m (IAU 2015 B2 quotes 3.085 677 581 491 367 × 10^16 m)', () => {
    expectRel(PARSEC_M, 30856775814913672.789, 1e-15);
    expectRel(PARSEC_M, 3.085677581491367e16, 1e-15);
    expect(AU_M).toBe(149597870700);
  });

  it('nominal solar mass GM☉/G = 1.98841e30 kg (bc: 1.988409870698e30; IAU 2015 B3 quotes 1.9884e30 kg via CODATA G)', () => {
    expectRel(SOLAR_MASS_KG, 1.988409870698050731e30, 1e-14);
  });
});

describe('unitsG(preset): G in common simulation units', () => {
  // (preset, value from bc, a remark on an independent published figure)
  const cases: [string, number][] = [
    ['G1', 1],
    ['si', 6.6743e-11],
    ['cgs', 6.6743e-8],
    // bc: 1.3271244e20 / (pc · 1e6); widely quoted as 4.3009e-3 pc (km/s)² M☉⁻¹ (from memory)
    ['pc-kms-msun', 0.0043009172700362792648],
    // the figure PHYSICS.md quotes: G ≈ 4.3009e-6 kpc (km/s)² M☉⁻¹
    ['kpc-kms-msun', 0.0000043009172700362792648],
    ['kpc-kms-1e10msun', 43009.172700362792648],
    // the usual cosmological-code value, ≈ 43.0092 Mpc (km/s)² (1e10 M☉)⁻¹ (from memory)
    ['mpc-kms-1e10msun', 43.009172700362792648],
    // close to but not equal to 4π² = 39.4784…, because GM☉ in au³/yr² is not exactly 4π² (Gaussian constant)
    ['au-yr-msun', 39.476926408897625196],
  ];
  for (const [name, value] of cases) {
    it(`${name}: ${value}`, () => expectRel(unitsG(name), value, 1e-13));
  }

  it('matches the coarse published figures PHYSICS.md quotes (4.3009e-6 to 5 digits)', () => {
    expect(Number(unitsG('kpc-kms-msun').toPrecision(5))).toBe(4.3009e-6);
    expect(Number(unitsG('mpc-kms-1e10msun').toPrecision(5))).toBe(43.009);
  });

  it('the au-yr preset differs from 4π² by 3.8e-5 relative (the year is not exactly the Gaussian year)', () => {
    expect(Math.abs(unitsG('au-yr-msun') / (4 * Math.PI * Math.PI) - 1)).toBeGreaterThan(3e-5);
  });

  it('finds presets case-insensitively and refuses unknown names with the list', () => {
    expect(unitPresetFind('KPC-KMS-MSUN')?.name).toBe('kpc-kms-msun');
    expect(() => unitsG('furlongs')).toThrow(/unknown unit preset "furlongs"; presets: G1, si, cgs/);
    expect(new Set(UNIT_PRESETS.map((p) => p.name)).size).toBe(UNIT_PRESETS.length);
  });
});
