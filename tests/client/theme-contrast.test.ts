import { readFileSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import theme from '../../tailwind.config';

/*
 * WCAG 2.2 AA contrast of every text/background pair the styles use, with the colours taken from
 * the theme tokens in tailwind.config.ts.
 *
 * Formulas from WCAG 2.2 (W3C Recommendation, 5 October 2023), section "Definitions":
 *  - "relative luminance": L = 0.2126 R + 0.7152 G + 0.0722 B, where each of R, G, B is
 *    c/12.92 if c <= 0.04045, else ((c + 0.055)/1.055)^2.4, and c is the sRGB channel / 255.
 *  - "contrast ratio": (L1 + 0.05) / (L2 + 0.05), L1 the lighter colour's luminance.
 * Thresholds from success criteria 1.4.3 Contrast (Minimum): 4.5:1 for text, 3:1 for large
 * text (at least 18 pt, or 14 pt bold); and 1.4.11 Non-text Contrast: 3:1 for the parts of
 * user-interface components needed to identify them (input borders, the current-tab underline).
 */
function channel(c8: number): number {
  const c = c8 / 255;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}
export function relativeLuminance(hex: string): number {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (!m) throw new Error(`not a #rrggbb colour: ${hex}`);
  const channelAt = (i: number) => channel(parseInt(hex.slice(i, i + 2), 16));
  const [r, g, b] = [channelAt(1), channelAt(3), channelAt(5)];
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
export function contrastRatio(a: string, b: string): number {
  const [la, lb] = [relativeLuminance(a), relativeLuminance(b)];
  const [hi, lo] = [Math.max(la, lb), Math.min(la, lb)];
  return (hi + 0.05) / (lo + 0.05);
}

const TEXT = 4.5;
const LARGE_OR_UI = 3;

// ---- colour tokens -------------------------------------------------------------------------
type Scale = Record<string, string>;
const colors = theme.theme.extend.colors as Record<string, Scale>;
/** `loam-900` → '#23201a'; `shoot` → its DEFAULT; white and black as CSS knows them. */
function token(name: string): string | undefined {
  if (name === 'white') return '#ffffff';
  if (name === 'black') return '#000000';
  const [, scale, step = 'DEFAULT'] = /^([a-z]+)(?:-(\d{2,3}))?$/.exec(name) ?? [];
  if (scale === undefined) return undefined;
  return colors[scale]?.[step];
}

// ---- where the class names are --------------------------------------------------------------
const ROOT = path.resolve(__dirname, '../..');
function files(dir: string, ext: RegExp): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    if (name === 'dist' || name === 'node_modules') return [];
    return statSync(p).isDirectory() ? files(p, ext) : ext.test(name) ? [p] : [];
  });
}

interface ClassList {
  where: string;
  classes: string[];
}

/** Every quoted string (EJS attributes, TSX literals) that holds Tailwind classes. */
function classLists(file: string): ClassList[] {
  const text = readFileSync(file, 'utf8');
  const out: ClassList[] = [];
  for (const m of text.matchAll(/(["'`])((?:(?!\1)[^\n])*?)\1/g)) {
    const classes = (m[2] ?? '').split(/\s+|\$\{|\}/).filter(Boolean);
    if (!classes.some((c) => /^(?:[a-z-]+:)*(?:text|bg)-[a-z]+(?:-\d+)?$/.test(c))) continue;
    const line = text.slice(0, m.index).split('\n').length;
    out.push({ where: `${path.relative(ROOT, file)}:${line}`, classes });
  }
  return out;
}

/** The @apply classes of each rule of a stylesheet, keyed by selector. */
function cssRules(file: string): ClassList[] {
  const text = readFileSync(file, 'utf8');
  const out: ClassList[] = [];
  for (const m of text.matchAll(/([^{}]+)\{([^{}]*@apply[^{}]*)\}/g)) {
    const [, selectors = '', body = ''] = m;
    const classes = [...body.matchAll(/@apply([^;]+);/g)].flatMap((a) => (a[1] ?? '').trim().split(/\s+/));
    const selector = selectors.trim().split('\n').filter((l) => !l.trim().startsWith('/*') && !l.trim().startsWith('*')).join(' ');
    out.push({ where: `${path.relative(ROOT, file)} ${selector}`, classes });
  }
  return out;
}

/** The colour of a utility with the given prefix (text, bg, border…) and variant ('' or 'hover:'). */
function pick(classes: string[], kind: 'text' | 'bg', variant = ''): string | undefined {
  for (const c of classes) {
    const m = new RegExp(`^${variant}${kind}-([a-z]+(?:-\\d+)?)$`).exec(c);
    const name = m?.[1];
    if (name && token(name)) return name;
  }
  return undefined;
}

// Grounds a text colour with no background of its own may sit on: the office page (mist-50),
// cards and tables (white), striped rows (mist-50), table heads (mist-200), hovered rows and
// cautions (dusk-50) and the phone page (mist).
const LIGHT_GROUNDS = ['white', 'mist-50', 'mist', 'mist-200', 'dusk-50'];
// Text colours meant for the dark headers only (loam on the phone, loam-900 in the office, the
// offline bar loam-700); lists whose text has no background are checked on these instead.
const DARK_GROUNDS = ['loam', 'loam-900', 'loam-700'];
const isLight = (name: string) => relativeLuminance(token(name)!) > 0.4;

interface Pair {
  where: string;
  text: string;
  ground: string;
  min: number;
}

function pairsOf(list: ClassList): Pair[] {
  const out: Pair[] = [];
  const large = list.classes.some((c) => /^text-(?:xl|[2-9]xl)$/.test(c)) || (list.classes.includes('text-lg') && list.classes.includes('font-bold'));
  const min = large ? LARGE_OR_UI : TEXT;
  for (const variant of ['', 'hover:', 'focus:', 'aria-invalid:', 'disabled:']) {
    const text = pick(list.classes, 'text', variant);
    const bg = pick(list.classes, 'bg', variant);
    if (variant && !text && !bg) continue;
    const t = text ?? pick(list.classes, 'text');
    const b = bg ?? pick(list.classes, 'bg');
    if (t && b) out.push({ where: `${list.where} ${variant}`, text: t, ground: b, min });
    else if (t && !variant) {
      for (const g of isLight(t) ? DARK_GROUNDS : LIGHT_GROUNDS) out.push({ where: list.where, text: t, ground: g, min });
    } else if (b && !variant) {
      // A background with inherited text: the body's loam on light grounds, white on dark ones.
      out.push({ where: list.where, text: isLight(b) ? 'loam' : 'white', ground: b, min });
    }
  }
  // A disabled control is exempt from 1.4.3 ("part of an inactive user interface component").
  return out.filter((p) => !p.where.endsWith('disabled:'));
}

const sources = [
  ...cssRules(path.join(ROOT, 'client/styles/office.css')),
  ...cssRules(path.join(ROOT, 'client/styles/capture.css')),
  ...files(path.join(ROOT, 'views'), /\.ejs$/).flatMap(classLists),
  ...files(path.join(ROOT, 'client'), /\.tsx?$/).flatMap(classLists),
];
const ALL_PAIRS = sources.flatMap(pairsOf);

describe('the WCAG formulas written here', () => {
  it('give 21:1 for black on white and 1:1 for a colour on itself (WCAG 2.2, "contrast ratio": ratios range from 1 to 21)', () => {
    expect(contrastRatio('#000000', '#ffffff')).toBeCloseTo(21, 10);
    expect(contrastRatio('#6f6757', '#6f6757')).toBeCloseTo(1, 10);
  });

  it('match a hand-worked grey', () => {
    // #777777: c = 119/255 = 0.466667 > 0.04045, so ((0.466667 + 0.055)/1.055)^2.4
    // = 0.494471^2.4 = e^(2.4 · ln 0.494471) = e^(2.4 · −0.704182) = e^(−1.690037) = 0.184475;
    // the three weights sum to 1, so L = 0.184475, and on white (L = 1):
    // (1 + 0.05) / (0.184475 + 0.05) = 1.05 / 0.234475 = 4.478 (just short of 4.5).
    expect(relativeLuminance('#777777')).toBeCloseTo(0.184475, 5);
    expect(contrastRatio('#777777', '#ffffff')).toBeCloseTo(4.478, 3);
  });

  it('use the 0.04045 threshold of WCAG 2.2 for the linear part', () => {
    // #0a0a0a: c = 10/255 = 0.039216 ≤ 0.04045, so c/12.92 = 0.0030353.
    expect(relativeLuminance('#0a0a0a')).toBeCloseTo(0.0030353, 6);
  });
});

describe('every text/background pair the styles use (WCAG 2.2 AA)', () => {
  it('finds the pairs in office.css, the views and the phone app', () => {
    // Enough that a broken scan (no pairs found) cannot pass silently.
    expect(ALL_PAIRS.length).toBeGreaterThan(150);
    const wheres = ALL_PAIRS.map((p) => p.where).join('\n');
    for (const expected of ['.btn', '.alert-error', '.caution', '.tab', '.badge-flag', 'views/partials/head.ejs', 'client/app/shell.tsx']) {
      expect(wheres).toContain(expected);
    }
  });

  it('reach 4.5:1 for text and 3:1 for large text', () => {
    const failing = ALL_PAIRS.filter((p) => contrastRatio(token(p.text)!, token(p.ground)!) < p.min).map(
      (p) => `${p.where}: ${p.text} on ${p.ground} = ${contrastRatio(token(p.text)!, token(p.ground)!).toFixed(2)} < ${p.min}`,
    );
    expect(failing).toEqual([]);
  });

  // Pairs set by inheritance or by a border, which no single class list shows.
  it.each([
    ['office header links (inherit white) on the header', 'white', 'loam-900', TEXT],
    ['the name under Account on the header', 'loam-200', 'loam-900', TEXT],
    ['Sign out on the header', 'loam-100', 'loam-900', TEXT],
    ['the mark on the office header', 'dusk-300', 'loam-900', LARGE_OR_UI],
    ['the mark on the phone header (straw is the accent there)', 'straw', 'loam', LARGE_OR_UI],
    ['current area underline on the header', 'dusk-300', 'loam-900', LARGE_OR_UI],
    ['hovered area underline on the header', 'dusk-400', 'loam-900', LARGE_OR_UI],
    ['current tab underline on the page', 'dusk-600', 'mist-50', LARGE_OR_UI],
    ['input border on white', 'loam-400', 'white', LARGE_OR_UI],
    ['secondary button border on the page', 'loam-500', 'mist-50', LARGE_OR_UI],
    ['caution bar against its own ground', 'dusk-400', 'dusk-50', LARGE_OR_UI],
    ['focus ring on the page', 'sky-600', 'mist-50', LARGE_OR_UI],
    ['focus ring on white', 'sky-600', 'white', LARGE_OR_UI],
    ['links on a caution', 'dusk-700', 'dusk-50', TEXT],
    ['links on an information alert', 'dusk-700', 'sky-50', TEXT],
    ['links on a hovered table row', 'dusk-700', 'dusk-50', TEXT],
  ])('%s: %s on %s', (_label, text, ground, min) => {
    expect(contrastRatio(token(text)!, token(ground)!)).toBeGreaterThanOrEqual(min);
  });
});

describe('colours of our own', () => {
  it('keep the gold accent out: no yellow hue among the accent tokens', () => {
    // Hue from sRGB (common practice, no published source): yellow/gold lies between 40° and 65°.
    const hue = (hex: string) => {
      const channelAt = (i: number) => parseInt(hex.slice(i, i + 2), 16) / 255;
      const [r, g, b] = [channelAt(1), channelAt(3), channelAt(5)];
      const max = Math.max(r, g, b);
      const d = max - Math.min(r, g, b);
      if (d === 0) return 0;
      const h = max === r ? ((g - b) / d) % 6 : max === g ? (b - r) / d + 2 : (r - g) / d + 4;
      return (h * 60 + 360) % 360;
    };
    for (const name of ['dusk', 'straw']) {
      const scale = colors[name];
      if (!scale) throw new Error(`tailwind.config.ts has no ${name} colour scale`);
      for (const [step, hex] of Object.entries(scale)) {
        const h = hue(hex);
        expect(h < 40 || h > 65, `${name}-${step} ${hex} hue ${h.toFixed(0)}°`).toBe(true);
      }
    }
  });
});
