import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import theme from '../../tailwind.config';
import { Mark, MARK_PATHS } from '../../client/app/mark';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { TodayRoute } from '../../client/features/today/routes/today';
import { sessionKeys } from '../../client/features/session/api';
import { todayKeys } from '../../client/features/today/api';
import { i18n, loadLanguage, setLanguage } from '../../client/lib/i18n';

const read = (p: string) => readFileSync(new URL(p, import.meta.url), 'utf8');

// The class names the EJS views rely on (foundation issue); renaming one breaks the office pages.
const OFFICE_CLASSES = [
  'btn', 'btn-secondary', 'btn-danger', 'btn-link', 'card', 'field', 'input', 'field-error', 'table',
  'badge', 'badge-readonly', 'alert', 'alert-error', 'alert-info', 'caution', 'page-title', 'nav-link',
  'nav-link-active',
];

describe('office.css', () => {
  const css = read('../../client/styles/office.css');
  it.each(OFFICE_CLASSES)('defines .%s', (name) => {
    expect(css).toMatch(new RegExp(`\\.${name}(?![\\w-])`));
  });
  it('scans the EJS views and has print rules', () => {
    expect(css).toContain('@source "../../views"');
    expect(css).toContain('@media print');
  });
});

// WCAG 2.x relative luminance and contrast ratio.
function luminance(hex: string): number {
  const channel = (i: number) => {
    const v = parseInt(hex.slice(i, i + 2), 16) / 255;
    return v <= 0.03928 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4;
  };
  const [r, g, b] = [channel(1), channel(3), channel(5)];
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}
function contrast(a: string, b: string): number {
  const [la, lb] = [luminance(a), luminance(b)];
  const [hi, lo] = [Math.max(la, lb), Math.min(la, lb)];
  return (hi + 0.05) / (lo + 0.05);
}

describe('palette contrast (WCAG AA: 4.5 for text, 3 for borders)', () => {
  const c = theme.theme.extend.colors;
  const white = '#ffffff';
  it.each([
    ['white on shoot (primary button)', white, c.shoot.DEFAULT, 4.5],
    ['white on shoot-800 (hover)', white, c.shoot[800], 4.5],
    ['white on clay (danger button)', white, c.clay.DEFAULT, 4.5],
    ['white on sky (info)', white, c.sky.DEFAULT, 4.5],
    ['loam on straw (accent)', c.loam.DEFAULT, c.straw.DEFAULT, 4.5],
    ['loam on mist (page)', c.loam.DEFAULT, c.mist.DEFAULT, 4.5],
    ['loam-500 on white (muted text)', c.loam[500], white, 4.5],
    ['loam-500 on mist (muted text)', c.loam[500], c.mist.DEFAULT, 4.5],
    ['clay-600 on white (field error)', c.clay[600], white, 4.5],
    ['clay-800 on clay-50 (alert-error)', c.clay[800], c.clay[50], 4.5],
    ['sky-800 on sky-50 (alert-info)', c.sky[800], c.sky[50], 4.5],
    ['shoot-700 on white (links)', c.shoot[700], white, 4.5],
    ['straw on loam (header mark)', c.straw.DEFAULT, c.loam.DEFAULT, 4.5],
    ['loam-400 input border on white', c.loam[400], white, 3],
    ['sky-600 focus ring on mist', c.sky[600], c.mist.DEFAULT, 3],
  ])('%s', (_label, fg, bg, min) => {
    expect(contrast(fg, bg)).toBeGreaterThanOrEqual(min);
  });
});

describe('the Crowntip mark', () => {
  it('is the same drawing in mark.svg and mark.tsx', () => {
    const svg = read('../../client/assets/mark.svg');
    const fromFile = [...svg.matchAll(/<path d="([^"]+)"[^>]*stroke-width="([\d.]+)"/g)].map((m) => ({
      d: m[1],
      w: Number(m[2]),
    }));
    expect(fromFile).toEqual(MARK_PATHS.map((p) => ({ d: p.d, w: p.w })));
  });

  it('uses currentColor only', () => {
    expect(read('../../client/assets/mark.svg')).not.toMatch(/#[0-9a-f]{3,6}\b/i);
    expect(renderToStaticMarkup(<Mark />)).toContain('stroke="currentColor"');
  });

  it('is hidden from screen readers unless titled', () => {
    expect(renderToStaticMarkup(<Mark />)).toContain('aria-hidden="true"');
    const titled = renderToStaticMarkup(<Mark title="Crowntip" />);
    expect(titled).toContain('role="img"');
    expect(titled).toContain('aria-label="Crowntip"');
  });
});

describe("Today's walks", () => {
  const user = {
    id: 'u1',
    name: 'Rosa Quintero',
    email: 'rosa@example.test',
    role: 'sampler' as const,
    organisation: { id: 'o1', name: 'Arroyo Seco Growers' },
    units: 'us' as const,
    language: 'en' as const,
  };
  function render() {
    const qc = new QueryClient();
    qc.setQueryData(sessionKeys.current(), { user, csrfToken: 't' });
    qc.setQueryData(todayKeys.list('u1'), { items: [], total: 0 });
    return renderToStaticMarkup(
      <QueryClientProvider client={qc}>
        <TodayRoute />
      </QueryClientProvider>,
    );
  }

  it('shows the empty state, the language switch and the screening caution', async () => {
    await loadLanguage('en');
    await setLanguage('en');
    const html = render();
    expect(html).toContain("Today&#x27;s walks");
    expect(html).toContain('No walks planned for today yet');
    expect(html).toContain('Español');
    expect(html).toContain(
      'Field estimates are screening figures; the local rule and your adviser decide what is reported.',
    );
  });

  it('speaks Spanish when the sampler chose it', async () => {
    await setLanguage('es');
    const html = render();
    expect(html).toContain('Recorridos de hoy');
    expect(html).toContain('Buscar campo por nombre');
    await i18n.changeLanguage('en');
  });
});

describe('index.html', () => {
  const html = read('../../client/index.html');
  it('has no inline script or style (strict CSP)', () => {
    expect(html).not.toMatch(/<script(?![^>]*\bsrc=)[^>]*>/);
    expect(html).not.toMatch(/<style|\sstyle=/);
  });
  it('mounts the app', () => {
    expect(html).toContain('<div id="root"></div>');
    expect(html).toContain('src="/main.tsx"');
    expect(html).toContain('<title>Crowntip — Capture</title>');
  });
});
