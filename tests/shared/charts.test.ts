import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { barChartSvg, escapeXml, niceStep, niceTicks, renderChart, tickLabel, type ChartSpec } from '../../shared/charts/svg';

// Tick steps of 1, 2 and 5 × 10^k, rounded as in P. Heckbert, "Nice numbers for graph labels",
// Graphics Gems (1990): f < 1.5 → 1, < 3 → 2, < 7 → 5, else 10.
describe('nice ticks', () => {
  it.each([
    [0, 10, 6, 2],
    [0, 100, 6, 20],
    [0, 15_000, 6, 2_000],
    [0, 1, 6, 0.2],
    [10.4, 47.8, 6, 5],
    [-2500, 3100, 6, 1000],
  ])('niceStep(%d, %d, %d) = %d', (lo, hi, count, step) => {
    expect(niceStep(lo, hi, count)).toBeCloseTo(step, 12);
  });

  it('widens the ends to whole steps and lists every tick', () => {
    expect(niceTicks(3.2, 47.8)).toEqual({ min: 0, max: 50, step: 10, ticks: [0, 10, 20, 30, 40, 50] });
    expect(niceTicks(0, 15_000).ticks).toEqual([0, 2000, 4000, 6000, 8000, 10_000, 12_000, 14_000, 16_000]);
    expect(niceTicks(0, 0.95).ticks).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(niceTicks(5, 5).ticks.length).toBeGreaterThan(1); // a single value still gets an axis
    expect(niceTicks(NaN, 1).ticks).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
  });

  it('labels ticks with the decimals the step needs and grouped thousands', () => {
    expect(tickLabel(15000, 5000)).toBe('15,000');
    expect(tickLabel(0.4, 0.2)).toBe('0.4');
    expect(tickLabel(-2000, 1000)).toBe('−2,000');
    expect(tickLabel(0, 0.5)).toBe('0.0');
    expect(tickLabel(-0.001, 0.5)).toBe('0.0'); // −0.001 to one decimal is 0.0: no minus sign on zero
    expect(tickLabel(-0.25, 0.05)).toBe('−0.25');
  });
});

describe('renderChart', () => {
  const spec: ChartSpec = {
    id: 'test',
    title: 'Rye <demo> & "friends"',
    description: 'Points & a curve',
    xAxis: { label: 'Length (in)', include: 0 },
    yAxis: { label: 'Biomass (lb/ac)', include: 0 },
    layers: [
      { kind: 'band', label: '90 % prediction band', lower: [{ x: 10, y: 500 }, { x: 40, y: 4000 }], upper: [{ x: 10, y: 1500 }, { x: 40, y: 9000 }] },
      { kind: 'points', label: 'Samples', points: [{ x: 12, y: 900 }, { x: 30, y: 4200 }, { x: NaN, y: 3 }] },
      { kind: 'line', label: 'Curve', points: [{ x: 10, y: 1000 }, { x: 40, y: 6000 }] },
      { kind: 'hline', label: 'Threshold 4,500 lb/ac', y: 4500 },
      { kind: 'marker', label: 'Reaches the threshold', x: 31, y: 4500, text: '31.0 in' },
    ],
  };
  const svg = renderChart(spec);

  it('is accessible: role img, a label, a title and a description', () => {
    expect(svg).toMatch(/^<svg [^>]*role="img"/);
    expect(svg).toContain('aria-label="Rye &lt;demo&gt; &amp; &quot;friends&quot;"');
    expect(svg).toContain('<title id="test-title">Rye &lt;demo&gt; &amp; &quot;friends&quot;</title>');
    expect(svg).toContain('<desc id="test-desc">Points &amp; a curve</desc>');
    expect(svg).toContain('aria-describedby="test-desc"');
  });

  it('draws each layer with its own dash pattern or glyph, so it reads in black and white', () => {
    expect(svg).toContain('<polygon points=');
    expect(svg).toContain('stroke-dasharray="5 3"'); // band edges
    expect(svg).toContain('stroke-dasharray="9 3 2 3"'); // threshold
    expect(svg).toContain('stroke-dasharray="2 2"'); // marker drop line
    expect(svg.match(/<circle /g)?.length).toBe(2 + 1); // two finite points and the legend glyph
    expect(svg).toContain('>31.0 in</text>');
    for (const label of ['90 % prediction band', 'Samples', 'Curve', 'Threshold 4,500 lb/ac', 'Reaches the threshold']) expect(svg).toContain(`>${label}</text>`);
  });

  it('uses presentation attributes only (no style attributes: the CSP forbids inline styles) and no script', () => {
    expect(svg).not.toMatch(/\sstyle=/);
    expect(svg).not.toMatch(/<script|on\w+=/i);
    expect(svg).not.toContain('NaN');
    expect(svg).not.toContain('Infinity');
  });

  it('puts the data where the axes say: threshold line between the 4,000 and 6,000 ticks', () => {
    const y = (label: string) => Number(svg.match(new RegExp(`<text x="[\\d.]+" y="([\\d.]+)" text-anchor="end"[^>]*>${label}</text>`))![1]) - 4;
    const threshold = Number(svg.match(/<line x1="[\d.]+" y1="([\d.]+)" x2="[\d.]+" y2="[\d.]+" stroke="#a63d1f"/)![1]);
    expect(threshold).toBeCloseTo(y('4,000') + ((y('6,000') - y('4,000')) * 500) / 2000, 1);
  });

  it('shared/charts is pure (no node:, DOM-only, express, knex or react imports: only the shared formatter)', () => {
    const src = readFileSync('shared/charts/svg.ts', 'utf8');
    const specs = [...src.matchAll(/^\s*import\s[^;]*?from\s+'([^']+)'/gms)].map((m) => m[1]);
    expect(specs).toEqual(['../format/figures']);
    expect(src).not.toMatch(/\brequire\(|\bimport\(/);
  });

  it('escapes text for XML', () => {
    expect(escapeXml(`<a href='x'>&</a>`)).toBe('&lt;a href=&#39;x&#39;&gt;&amp;&lt;/a&gt;');
  });
});

describe('barChartSvg', () => {
  const chart = (values: number[]) =>
    barChartSvg({
      id: 'c',
      title: 'Credit by ranch',
      description: 'd',
      axisLabel: 'Credit (lb N)',
      formatTick: (n) => String(n),
      emptyNote: 'No credit yet',
      bars: values.map((v, i) => ({ label: `Ranch ${i}`, value: v, valueText: `${v} lb N` })),
    });

  it('draws no numeric axis when every value is 0 (no invented 0–4 lb N scale)', () => {
    const svg = chart([0, 0]);
    const ticks = [...svg.matchAll(/text-anchor="middle" fill="#23201a">([^<]*)</g)].map((m) => m[1]);
    expect(ticks).toEqual(['No credit yet']);
    expect(svg).not.toContain('Credit (lb N)');
    expect(svg).toContain('0 lb N');
  });

  it('ticks 0–1,000 by 500 for a largest bar of 900 (steps of 1, 2 or 5 × 10^k, about four)', () => {
    // By hand: 900 / 4 = 225; magnitude 100, f = 2.25, so f ≤ 5 gives a step of 500; the end is ⌈900 / 500⌉ × 500 = 1,000.
    const ticks = [...chart([900, 300]).matchAll(/text-anchor="middle" fill="#23201a">([^<]*)</g)].map((m) => m[1]);
    expect(ticks).toEqual(['0', '500', '1000', 'Credit (lb N)']);
  });
});
