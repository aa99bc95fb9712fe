/*
 * The /capture first load and the live estimate's cost per keystroke.
 *
 * First load = what a phone downloads before Today's walks can draw: the HTML, the entry chunk and
 * everything it imports statically, the stylesheet, the larger of the two language chunks (the app
 * loads exactly one before its first render) and the Lato woff2 subset the stylesheet uses. Sizes
 * are gzip at zlib's default level 6 (what a compressing proxy or CDN typically uses); fonts are
 * already compressed, so they count as they are. Budget: first-screen JS at most 110 KB (110,000
 * bytes) gzipped. Reads client/dist (builds it first when it is missing, or with --build).
 * Run alone with `npx tsx bench/capture-size.ts`; `npm run bench` puts its numbers in its table.
 */
import fs from 'node:fs';
import path from 'node:path';
import zlib from 'node:zlib';
import { pathToFileURL } from 'node:url';
import { measure, printTable } from './calc';
import { makeKeystroke } from './keystroke';

export const FIRST_SCREEN_JS_BUDGET = 110_000;
const DIST = path.resolve('client/dist');
const MANIFEST = path.join(DIST, '.vite/manifest.json');

interface ManifestEntry {
  file: string;
  src?: string;
  isEntry?: boolean;
  imports?: string[];
  dynamicImports?: string[];
  css?: string[];
  assets?: string[];
}

export interface SizeRow {
  kind: 'html' | 'js' | 'css' | 'font';
  file: string;
  raw: number;
  gzip: number;
}

async function ensureBuilt(force: boolean) {
  if (!force && fs.existsSync(MANIFEST)) return;
  const { build } = await import('vite');
  await build({ configFile: path.resolve('vite.config.ts'), logLevel: 'warn' });
}

const gz = (buf: Buffer) => zlib.gzipSync(buf, { level: 6 }).length;

export function firstScreenSizes(): SizeRow[] {
  const manifest = JSON.parse(fs.readFileSync(MANIFEST, 'utf8')) as Record<string, ManifestEntry>;
  const rows: SizeRow[] = [];
  const add = (kind: SizeRow['kind'], file: string) => {
    const buf = fs.readFileSync(path.join(DIST, file));
    rows.push({ kind, file, raw: buf.length, gzip: kind === 'font' ? buf.length : gz(buf) });
  };

  add('html', 'index.html');
  const seen = new Set<string>();
  const css = new Set<string>();
  const visit = (key: string) => {
    if (seen.has(key)) return;
    seen.add(key);
    const entry = manifest[key];
    if (!entry) throw new Error(`${key} is not in ${MANIFEST}: rebuild the client`);
    add('js', entry.file);
    entry.css?.forEach((c) => css.add(c));
    entry.imports?.forEach(visit);
  };
  visit('index.html');

  // One language chunk loads before the first render: count the larger.
  const languages = Object.values(manifest).filter((e) => /(^|\/)locales\/(en|es)\.ts$/.test(e.src ?? ''));
  const sizes = languages.map((e) => ({ e, size: gz(fs.readFileSync(path.join(DIST, e.file))) }));
  sizes.sort((a, b) => b.size - a.size);
  const [larger] = sizes;
  if (larger) visit(Object.keys(manifest).find((k) => manifest[k] === larger.e)!);

  for (const c of css) add('css', c);
  // The Lato subset the stylesheet asks for first (woff2: every browser that runs the app reads it).
  const cssText = [...css].map((c) => fs.readFileSync(path.join(DIST, c), 'utf8')).join('\n');
  const fonts = new Set([...cssText.matchAll(/url\(\/static\/(assets\/lato-[^)]+\.woff2)\)/g)].flatMap((m) => (m[1] ? [m[1]] : [])));
  for (const f of fonts) add('font', f);
  return rows;
}

/** The phone's work per keystroke (bench/keystroke.ts), timed in node at full speed. */
export function keystrokeBench() {
  return [measure('live estimate per keystroke (10 stops: checks + estimate)', makeKeystroke(), { batch: 500, samples: 60 })];
}

export async function runCaptureBench(opts: { build?: boolean; quiet?: boolean } = {}) {
  await ensureBuilt(Boolean(opts.build));
  const rows = firstScreenSizes();
  const js = rows.filter((r) => r.kind === 'js').reduce((s, r) => s + r.gzip, 0);
  if (opts.quiet) return { rows, js };
  const kb = (n: number) => `${(n / 1000).toFixed(1)} KB`;
  const w = Math.max(...rows.map((r) => r.file.length));
  console.log('\n/capture first load (Today), client/dist, gzip level 6');
  console.log(`${'kind'.padEnd(5)} ${'file'.padEnd(w)}  ${'raw'.padStart(10)}  ${'gzip'.padStart(10)}`);
  for (const r of rows) console.log(`${r.kind.padEnd(5)} ${r.file.padEnd(w)}  ${kb(r.raw).padStart(10)}  ${kb(r.gzip).padStart(10)}`);
  const sum = (kind?: SizeRow['kind']) => rows.filter((r) => !kind || r.kind === kind).reduce((s, r) => s + r.gzip, 0);
  console.log(
    `JS ${kb(js)} (budget ${kb(FIRST_SCREEN_JS_BUDGET)}: ${js <= FIRST_SCREEN_JS_BUDGET ? 'within' : 'OVER'}) · CSS ${kb(sum('css'))} · HTML ${kb(sum('html'))} · fonts ${kb(sum('font'))} · total ${kb(sum())}`,
  );
  printTable('Live estimate on the phone (target < 1 ms per keystroke)', keystrokeBench());
  return { rows, js };
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await runCaptureBench({ build: process.argv.includes('--build') });
