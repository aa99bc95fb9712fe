/** The one table `npm run bench` ends with: each target, what was measured, and PASS or FAIL. */

export type Verdict = 'PASS' | 'FAIL' | 'INFO' | 'NOT MEASURED';

export interface Row {
  what: string;
  measured: string;
  target: string;
  /** Share of bare Express for throughput rows; measured ÷ target for the others. */
  ratio: string;
  verdict: Verdict;
}

/** A row whose target is an upper bound (`measured ≤ limit`). */
export function atMost(what: string, value: number | null, limit: number, fmt: (n: number) => string): Row {
  if (value === null || !Number.isFinite(value)) return { what, measured: 'not measured', target: `≤ ${fmt(limit)}`, ratio: '—', verdict: 'FAIL' };
  return { what, measured: fmt(value), target: `≤ ${fmt(limit)}`, ratio: `${(value / limit).toFixed(2)}×`, verdict: value <= limit ? 'PASS' : 'FAIL' };
}

/** A throughput row: requests per second as a share of the bare Express route, at least `minPct`. */
export function shareOfBare(what: string, rps: number, bareRps: number, minPct: number): Row {
  const pct = (100 * rps) / bareRps;
  return {
    what,
    measured: `${Math.round(rps).toLocaleString('en-US')} req/s`,
    target: `≥ ${minPct} % of bare`,
    ratio: `${pct.toFixed(1)} %`,
    verdict: pct >= minPct ? 'PASS' : 'FAIL',
  };
}

export function printRows(title: string, rows: Row[]) {
  const head: Row = { what: 'what', measured: 'measured', target: 'target', ratio: 'ratio', verdict: 'PASS' };
  const cols: (keyof Row)[] = ['what', 'measured', 'target', 'ratio', 'verdict'];
  const width = Object.fromEntries(cols.map((c) => [c, Math.max(...[head, ...rows].map((r) => (c === 'verdict' ? 'result' : r[c]).length))])) as Record<keyof Row, number>;
  width.verdict = Math.max(width.verdict, ...rows.map((r) => r.verdict.length), 'result'.length);
  const line = (r: Row, verdict: string) =>
    `| ${r.what.padEnd(width.what)} | ${r.measured.padStart(width.measured)} | ${r.target.padEnd(width.target)} | ${r.ratio.padStart(width.ratio)} | ${verdict.padEnd(width.verdict)} |`;
  console.log(`\n${title}`);
  console.log(line(head, 'result'));
  console.log(`|${cols.map((c) => '-'.repeat(width[c] + 2)).join('|')}|`);
  for (const r of rows) console.log(line(r, r.verdict));
  const count = (v: Verdict) => rows.filter((r) => r.verdict === v).length;
  console.log(`${count('PASS')} PASS, ${count('FAIL')} FAIL, ${count('INFO')} for information, ${count('NOT MEASURED')} not measured yet`);
}
