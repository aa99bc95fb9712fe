// Number formatting for plain-words notes and equations. Hand-rolled rather than Intl so the
// server and every phone produce the same characters whatever locale data they carry.

/** v to `digits` significant digits, plain decimal where reasonable, exponent form otherwise. */
export function sig(v: number, digits: number): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (a >= 1e-4 && a < 1e9) return String(Number(v.toPrecision(digits)));
  return v.toExponential(digits - 1);
}

/** Rounded to `decimals` with thousands separators: 5043.83 → "5,044". */
export function fmt(v: number, decimals = 0): string {
  if (!Number.isFinite(v)) return String(v);
  const neg = v < 0 ? '-' : '';
  const fixed = Math.abs(v).toFixed(decimals);
  const [int = '', frac] = fixed.split('.');
  const grouped = int.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return neg + grouped + (frac ? `.${frac}` : '');
}
