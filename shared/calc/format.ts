// Significant digits for equations and fit notes. Hand-rolled rather than Intl so the server and
// every phone produce the same characters whatever locale data they carry. Figures to fixed
// decimals go through formatNumber in shared/format/figures.ts.

/** v to `digits` significant digits, plain decimal where reasonable, exponent form otherwise. */
export function sig(v: number, digits: number): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-4 && a < 1e9) return String(Number(v.toPrecision(digits)));
  return v.toExponential(digits - 1);
}
