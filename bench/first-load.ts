/**
 * A sampler's first visit to /capture on a phone, in Debian's Chromium driven over the DevTools
 * protocol: a fresh profile, signed in through the API first, then timed from the navigation to
 * /capture. Slow mobile link (150 ms round trip, 1.6 Mbps down, 750 kbps up), CPU slowed 4 times,
 * a 390x844 screen. Reports the encoded bytes of every response (what crossed the wire, headers
 * included), the Largest Contentful Paint, and the live estimate's time per keystroke run inside
 * that page under the same CPU slowdown.
 *
 * Run alone: `npx tsx bench/first-load.ts` (starts `npm start` on a fresh database);
 * `npm run bench` runs it against its own server and puts the numbers in its table.
 */
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';

export const SLOW_MOBILE = {
  latencyMs: 150,
  downBitsPerSec: 1_600_000,
  upBitsPerSec: 750_000,
  cpuSlowdown: 4,
  viewport: { width: 390, height: 844 },
};

export interface WireResponse {
  url: string;
  status: number;
  encoding: string;
  /** Bytes received for this response, headers included (Network.loadingFinished encodedDataLength). */
  bytes: number;
  /**
   * Answered without the network (by the service worker, or from the disk cache the worker's
   * precache had just filled): `bytes` are then what the worker fetched over the wire for this URL.
   */
  viaWorker?: boolean;
  /** When the page asked and when the last byte arrived, in ms from the navigation's request. */
  startMs?: number;
  endMs?: number;
}

export interface FirstLoadResult {
  /** What the page asked for, in order. */
  responses: WireResponse[];
  totalBytes: number;
  /** Everything the service worker downloaded during the visit (its precache), counted apart. */
  workerBytes: number;
  workerResponses: number;
  lcpMs: number | null;
  lcpElement: string | null;
  /** Every largest-contentful-paint entry, in order (the last is the LCP). */
  lcpCandidates: { startTime: number; element: string | null }[];
  fcpMs: number | null;
  keystrokeMs: number;
}

/** bench/keystroke-page.ts as one script (an IIFE defining `crowntipKeystroke.run`). */
async function keystrokeBundle(): Promise<string> {
  const { build } = await import('vite');
  const out = await build({
    configFile: false,
    logLevel: 'silent',
    root: process.cwd(),
    define: { 'process.env.NODE_ENV': '"production"' },
    build: {
      write: false,
      minify: true,
      emptyOutDir: false,
      lib: { entry: path.resolve('bench/keystroke-page.ts'), formats: ['iife'], name: 'crowntipKeystroke', fileName: 'keystroke' },
    },
  });
  const outputs = (Array.isArray(out) ? out : [out]) as { output: { type: string; code?: string }[] }[];
  const chunk = outputs.flatMap((o) => o.output).find((o) => o.type === 'chunk');
  if (!chunk?.code) throw new Error('could not bundle bench/keystroke-page.ts');
  return chunk.code;
}

export async function runFirstLoad(opts: { url: string; email: string; password: string }): Promise<FirstLoadResult> {
  const keystrokeCode = await keystrokeBundle();
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'crowntip-first-load-'));
  // Launch flags as the browser tests use them (tests/helpers/browser.ts).
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    headless: true,
    viewport: SLOW_MOBILE.viewport,
    deviceScaleFactor: 3,
    isMobile: true,
    hasTouch: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  try {
    // Signed in before the clock starts: the cookie lands in this profile's jar.
    const signIn = await context.request.post(`${opts.url}/api/session`, { data: { email: opts.email, password: opts.password } });
    if (!signIn.ok()) throw new Error(`sign-in as ${opts.email} answered ${signIn.status()}`);

    const page = context.pages()[0] ?? (await context.newPage());
    const cdp = await context.newCDPSession(page);
    await cdp.send('Network.enable');
    await cdp.send('Network.emulateNetworkConditions', {
      offline: false,
      latency: SLOW_MOBILE.latencyMs,
      downloadThroughput: SLOW_MOBILE.downBitsPerSec / 8,
      uploadThroughput: SLOW_MOBILE.upBitsPerSec / 8,
    });
    await cdp.send('Emulation.setCPUThrottlingRate', { rate: SLOW_MOBILE.cpuSlowdown });

    const seen = new Map<string, WireResponse>();
    const inflight = new Set<string>();
    const started = new Map<string, number>();
    let t0: number | null = null; // the navigation's request (CDP timestamps, seconds)
    let lastActivity = performance.now();
    cdp.on('Network.requestWillBeSent', (e) => {
      inflight.add(e.requestId);
      t0 ??= e.timestamp;
      started.set(e.requestId, e.timestamp);
      lastActivity = performance.now();
    });
    cdp.on('Network.responseReceived', (e) => {
      const h = Object.fromEntries(Object.entries(e.response.headers).map(([k, v]) => [k.toLowerCase(), String(v)]));
      seen.set(e.requestId, {
        url: e.response.url,
        status: e.response.status,
        encoding: h['content-encoding'] ?? '',
        bytes: 0,
        viaWorker: false,
        startMs: t0 === null ? undefined : ((started.get(e.requestId) ?? t0) - t0) * 1000,
      });
    });
    cdp.on('Network.loadingFinished', (e) => {
      inflight.delete(e.requestId);
      lastActivity = performance.now();
      const r = seen.get(e.requestId);
      if (r) {
        r.bytes = e.encodedDataLength;
        if (t0 !== null) r.endMs = (e.timestamp - t0) * 1000;
      }
    });
    cdp.on('Network.loadingFailed', (e) => {
      inflight.delete(e.requestId);
      lastActivity = performance.now();
    });

    // The service worker's own downloads (its precache) are not in the page's Network domain.
    const workerFetched = new Map<string, { bytes: number; encoding: string }>();
    let workerBytes = 0;
    let workerResponses = 0;
    context.on('requestfinished', (req) => {
      if (!req.serviceWorker()) return;
      void Promise.all([req.sizes(), req.response()]).then(([sz, res]) => {
        const bytes = sz.responseHeadersSize + sz.responseBodySize;
        workerBytes += bytes;
        workerResponses++;
        const [url = ''] = req.url().split('?');
        if (!workerFetched.has(url)) workerFetched.set(url, { bytes, encoding: res?.headers()['content-encoding'] ?? '' });
      });
    });

    await page.goto(`${opts.url}/capture`, { waitUntil: 'load', timeout: 60_000 });
    // Today drawn (its heading), however slow the CPU; then until the network has been quiet for
    // 2 s (the app's data requests come after load).
    await page.waitForSelector('#today-title', { timeout: 45_000 }).catch(() => undefined);
    const deadline = performance.now() + 45_000;
    while (performance.now() < deadline && (inflight.size > 0 || performance.now() - lastActivity < 2000)) {
      await new Promise((r) => setTimeout(r, 100));
    }

    // Every LCP candidate (the last one counts) and the first contentful paint, to read what held it back.
    const paints = (await cdp.send('Runtime.evaluate', {
      expression: `new Promise((resolve) => {
        const candidates = [];
        const describe = (el) => el ? el.tagName.toLowerCase() + (el.textContent ? ': ' + el.textContent.trim().slice(0, 40) : '') : null;
        new PerformanceObserver((list) => { for (const e of list.getEntries()) candidates.push({ startTime: e.startTime, element: describe(e.element) }); })
          .observe({ type: 'largest-contentful-paint', buffered: true });
        setTimeout(() => {
          const fcp = performance.getEntriesByName('first-contentful-paint')[0];
          resolve({ candidates, fcp: fcp ? fcp.startTime : null });
        }, 200);
      })`,
      awaitPromise: true,
      returnByValue: true,
    })) as { result: { value: { candidates: { startTime: number; element: string | null }[]; fcp: number | null } } };
    const candidates = paints.result.value.candidates;
    const lcp = candidates[candidates.length - 1] ?? null;

    // The live estimate, timed in this page (CPU still slowed 4 times).
    const ks = (await cdp.send('Runtime.evaluate', {
      expression: `${keystrokeCode}\n;crowntipKeystroke.run()`,
      returnByValue: true,
    })) as { result: { value: number }; exceptionDetails?: { text: string; exception?: { description?: string } } };
    if (ks.exceptionDetails) throw new Error(`keystroke bench failed in the page: ${ks.exceptionDetails.exception?.description ?? ks.exceptionDetails.text}`);

    // A file the page got without the network crossed the wire once, in the worker's download.
    const responses = [...seen.values()].map((r) => {
      const fetched = r.bytes === 0 ? workerFetched.get(r.url.split('?')[0] ?? r.url) : undefined;
      return fetched ? { ...r, bytes: fetched.bytes, encoding: fetched.encoding, viaWorker: true } : r;
    });
    return {
      responses,
      totalBytes: responses.reduce((s, r) => s + r.bytes, 0),
      workerBytes,
      workerResponses,
      lcpMs: lcp?.startTime ?? null,
      lcpElement: lcp?.element ?? null,
      lcpCandidates: candidates,
      fcpMs: paints.result.value.fcp,
      keystrokeMs: ks.result.value,
    };
  } finally {
    await context.close();
    fs.rmSync(profile, { recursive: true, force: true });
  }
}

export function printFirstLoad(r: FirstLoadResult, base: string) {
  const kib = (n: number) => `${(n / 1024).toFixed(1)} KiB`;
  const w = Math.max(...r.responses.map((x) => x.url.replace(base, '').length), 10);
  console.log(`\nFirst visit to /capture as a sampler (slow mobile: ${SLOW_MOBILE.latencyMs} ms, 1.6/0.75 Mbps, CPU x${SLOW_MOBILE.cpuSlowdown}), bytes on the wire`);
  for (const x of r.responses) {
    const via = x.viaWorker ? '  (fetched by the service worker)' : '';
    const when = x.startMs === undefined ? ''.padEnd(16) : `${x.startMs.toFixed(0).padStart(6)}–${x.endMs === undefined ? '?' : x.endMs.toFixed(0)} ms`.padEnd(16);
    console.log(`  ${x.url.replace(base, '').padEnd(w)}  ${String(x.status).padStart(3)}  ${(x.encoding || 'identity').padEnd(8)}  ${kib(x.bytes).padStart(10)}  ${when}${via}`);
  }
  console.log(`  ${'total'.padEnd(w)}  ${String(r.responses.length).padStart(3)}  ${''.padEnd(8)}  ${kib(r.totalBytes).padStart(10)}`);
  console.log(`  the service worker's precache download: ${kib(r.workerBytes)} in ${r.workerResponses} responses (counted apart)`);
  const at = (n: number) => `${(n / 1000).toFixed(2)} s`;
  console.log(`  first contentful paint ${r.fcpMs === null ? 'none' : at(r.fcpMs)}; LCP candidates: ${r.lcpCandidates.map((c) => `${at(c.startTime)} ${c.element ?? '?'}`).join(' → ') || 'none'}`);
  console.log(`  LCP ${r.lcpMs === null ? 'none' : `${(r.lcpMs / 1000).toFixed(2)} s`} (${r.lcpElement ?? '?'}); live estimate ${r.keystrokeMs.toFixed(3)} ms per keystroke in the page`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const { makeDataDir, startServer, DEMO_PASSWORD } = await import('./server-process');
  const data = makeDataDir();
  const server = await startServer(data);
  try {
    const r = await runFirstLoad({ url: server.url, email: 'sampler@crowntip.test', password: DEMO_PASSWORD });
    printFirstLoad(r, server.url);
  } finally {
    await server.stop();
    data.remove();
  }
}
