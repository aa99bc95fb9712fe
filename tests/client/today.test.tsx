import { beforeAll, describe, expect, it } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import { MemoryRouter } from 'react-router-dom';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import type { TodayItem } from '../../shared/schemas/walks';
import { TodayRoute } from '../../client/features/today/routes/today';
import { sessionKeys } from '../../client/features/session/api';
import { todayKeys } from '../../client/features/today/api';
import { loadLanguage, setLanguage } from '../../client/lib/i18n';

const user = {
  id: 'u1',
  name: 'Rosa Quintero',
  email: 'rosa@example.test',
  role: 'sampler' as const,
  organisation: { id: 'o1', name: 'Arroyo Seco Growers' },
  units: 'metric' as const,
  language: 'es' as const,
};

const item = (over: Partial<TodayItem>): TodayItem => ({
  plantingId: 'p1',
  fieldName: 'Mesa Alta',
  fieldId: 'f1',
  ranchId: 'r1',
  ranchName: 'Rancho Loma',
  areaHa: 7.25,
  boundary: null,
  season: '2026-27',
  crop: 'cereal_rye',
  variety: 'Demo Rye 12',
  seededOn: '2026-10-01',
  plannedTerminationOn: null,
  daysSinceSeeding: 1,
  assigned: true,
  calibrationId: 'c1',
  latestWalk: null,
  ...over,
});

function render(items: TodayItem[]) {
  const qc = new QueryClient();
  qc.setQueryData(sessionKeys.current(), { user, csrfToken: 't' });
  qc.setQueryData(todayKeys.list('u1'), { items, total: items.length });
  return renderToStaticMarkup(
    <QueryClientProvider client={qc}>
      <MemoryRouter>
        <TodayRoute />
      </MemoryRouter>
    </QueryClientProvider>,
  );
}

describe('Today in Spanish, metric', () => {
  beforeAll(async () => {
    await loadLanguage('es');
    await setLanguage('es');
  });

  it('shows each planting with ranch, area, crop, days since seeding and its latest walk', () => {
    const html = render([
      item({}),
      item({
        plantingId: 'p2',
        fieldName: 'Bajío 3',
        crop: 'triticale',
        variety: null,
        daysSinceSeeding: 94,
        assigned: false,
        latestWalk: { id: 'w1', status: 'rejected', walkedOn: '2027-02-14', rejectReason: 'Paradas fuera del campo' },
      }),
    ]);
    expect(html).toContain('Mesa Alta');
    expect(html).toContain('Rancho Loma · 7.3 ha');
    expect(html).toContain('Centeno');
    expect(html).toContain('1 día desde la siembra');
    expect(html).toContain('94 días desde la siembra');
    expect(html).toContain('Asignado a ti');
    expect(html).toContain('Sin recorrido todavía');
    expect(html).toContain('Recorrido rechazado el 14 feb 2027');
    expect(html).toContain('Motivo: Paradas fuera del campo');
    expect(html).toContain('href="/plantings/p2"');
    expect(html).toContain('Tus unidades: cm · kg/ha');
  });

  it('says when nothing is assigned, so all open plantings are listed', () => {
    expect(render([item({ assigned: false })])).toContain('No tienes campos asignados');
  });
});

describe('Today in groups', () => {
  beforeAll(async () => {
    await loadLanguage('en');
    await setLanguage('en');
  });

  it('lists assigned plantings, then the other open ones, each with rejected walks first', () => {
    const rejected = { id: 'w', status: 'rejected' as const, walkedOn: '2027-02-14', rejectReason: 'Stops outside the field' };
    const approved = { id: 'w2', status: 'approved' as const, walkedOn: '2027-02-10', rejectReason: null };
    const html = render([
      item({ plantingId: 'a1', fieldName: 'Assigned One' }),
      item({ plantingId: 'o1', fieldName: 'Other One', assigned: false, latestWalk: approved }),
      item({ plantingId: 'a2', fieldName: 'Assigned Rejected', latestWalk: rejected }),
      item({ plantingId: 'o2', fieldName: 'Other Rejected', assigned: false, latestWalk: rejected }),
    ]);
    const order = ['>Assigned to you<', 'Assigned Rejected', 'Assigned One', '>Other open plantings<', 'Other Rejected', 'Other One'].map(
      (s) => html.indexOf(s),
    );
    expect(order.every((i) => i >= 0)).toBe(true);
    expect([...order].sort((a, b) => a - b)).toEqual(order);
  });
});
