import { describe, expect, it } from 'vitest';
import { fitCalibration } from '../../shared/calc';
import { at } from '../helpers/lists';
import { readStrd } from './nist-strd';

// NIST/ITL StRD linear least squares reference data sets with certified values
// (https://www.itl.nist.gov/div898/strd/lls/lls.shtml), shipped under tests/fixtures/nist-strd/.
// Certified values are quoted to 15 significant digits; we require 9 (relative error ≤ 1e-9).

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('NIST StRD Norris (linear, lower difficulty)', () => {
  const file = readStrd('Norris.dat');
  // Certified values, copied from NIST's Norris.dat (via the stored copy in the fixture's header):
  const CERT = {
    b: [-0.262323073774029, 1.00211681802045],
    sd: [0.232818234301152, 0.429796848199937e-3],
    residualSd: 0.884796396144373,
    r2: 0.999993745883712,
  };

  it('fixture holds 36 observations and the certified values as listed here', () => {
    expect(file.points).toHaveLength(36);
    expect(file.estimates).toEqual(CERT.b);
    expect(file.standardDeviations).toEqual(CERT.sd);
    expect(file.residualSd).toBe(CERT.residualSd);
    expect(file.rSquared).toBe(CERT.r2);
  });

  it('reproduces coefficients, their standard deviations, residual SD and R² to 9 digits', () => {
    const f = fitCalibration(file.points, 'linear');
    expect(f.n).toBe(36);
    expect(f.df).toBe(34);
    expect(f.coefficients).toHaveLength(CERT.b.length);
    expect(f.standardErrors).toHaveLength(CERT.sd.length);
    CERT.b.forEach((want, i) => expect(rel(at(f.coefficients, i, 'coefficient'), want)).toBeLessThan(1e-9));
    CERT.sd.forEach((want, i) => expect(rel(at(f.standardErrors, i, 'standard error'), want)).toBeLessThan(1e-9));
    expect(rel(f.residualStdError, CERT.residualSd)).toBeLessThan(1e-9);
    expect(rel(f.rSquared, CERT.r2)).toBeLessThan(1e-12);
  });
});

describe('NIST StRD Pontius (quadratic, x up to 3·10⁶)', () => {
  const file = readStrd('Pontius.dat');
  // Certified values (NIST Pontius.dat; transcription sources in the fixture's header):
  const CERT = {
    b: [0.673565789473684e-3, 0.732059160401003e-6, -0.316081871345029e-14],
    sd: [0.107938612033077e-3, 0.157817399981659e-9, 0.486652849992036e-16],
    residualSd: 0.205177424076185e-3,
    r2: 0.999999900178537,
    residualSS: 0.155761768796992e-5, // certified ANOVA table
  };

  it('fixture holds 40 observations and the certified values as listed here', () => {
    expect(file.points).toHaveLength(40);
    expect(file.estimates).toEqual(CERT.b);
    expect(file.standardDeviations).toEqual(CERT.sd);
    expect(file.residualSd).toBe(CERT.residualSd);
    expect(file.rSquared).toBe(CERT.r2);
  });

  it('reproduces coefficients, their standard deviations, residual SD and R² to 9 digits', () => {
    const f = fitCalibration(file.points, 'quadratic');
    expect(f.df).toBe(37);
    expect(f.coefficients).toHaveLength(CERT.b.length);
    expect(f.standardErrors).toHaveLength(CERT.sd.length);
    CERT.b.forEach((want, i) => expect(rel(at(f.coefficients, i, 'coefficient'), want)).toBeLessThan(1e-9));
    CERT.sd.forEach((want, i) => expect(rel(at(f.standardErrors, i, 'standard error'), want)).toBeLessThan(1e-9));
    expect(rel(f.residualStdError, CERT.residualSd)).toBeLessThan(1e-9);
    expect(rel(f.rSquared, CERT.r2)).toBeLessThan(1e-12);
    expect(rel(f.residualStdError ** 2 * f.df, CERT.residualSS)).toBeLessThan(1e-9);
  });
});
