import { beforeEach, describe, expect, it, vi } from 'vitest';
import { renderToStaticMarkup } from 'react-dom/server';
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { newBoundaryJob, newJob, type QueueJob } from '../../client/features/offline/queue';
import { loadLanguage, setLanguage, type Language } from '../../client/lib/i18n';

/**
 * The outbox banner names what waits: walks, field outlines (boundaries traced on the phone, sent
 * through the same outbox), or both, with the plurals of each language. The outbox's state comes
 * from a stand-in of the feature's public module, so the banner is drawn as on the phone.
 */

const outbox = vi.hoisted(() => ({ jobs: [] as unknown[], online: true }));
vi.mock('../../client/features/offline/public', () => ({
  useQueueJobs: () => outbox.jobs,
  useOnline: () => outbox.online,
  useSendingId: () => null,
  loadOutbox: () => new Promise(() => undefined),
}));

const { QueueBanner } = await import('../../client/features/offline/components/queue-banner');
const { default: SentNote } = await import('../../client/features/offline/components/sent-note');
const { default: JobList } = await import('../../client/features/offline/components/job-list');

let n = 0;
const id = () => `00000000-0000-4000-8000-${String(++n).padStart(12, '0')}`;
const label = { fieldName: 'North Flat', ranchName: 'Test Ranch' };

function walk(over: Partial<QueueJob> = {}): QueueJob {
  const body = { id: id(), plantingId: 'p1', walkedOn: '2027-02-14', stage: 'Z31', notes: null, plants: [{ stop: 1, lengthCm: 4 }] };
  return { ...newJob({ body, userId: 'u1', photos: [], label, now: 0 }), ...over } as QueueJob;
}
function outline(over: Partial<QueueJob> = {}, fieldName = 'North Flat'): QueueJob {
  const body = {
    id: id(),
    boundary: { type: 'Polygon' as const, coordinates: [[[-134.9, 36.2], [-134.898, 36.2], [-134.898, 36.201], [-134.9, 36.2]]] },
    pointsRecorded: 40,
    medianAccuracyM: 5,
  };
  return { ...newBoundaryJob({ fieldId: 'f1', body, userId: 'u1', label: { ...label, fieldName }, now: 0 }), ...over } as QueueJob;
}
const times = (k: number, make: () => QueueJob) => Array.from({ length: k }, make);
const needsPerson = { state: 'attention' as const, attention: 'conflict' as const };
const needsSignIn = { attention: 'signin' as const };

/** The banner's lines as text. */
function banner(jobs: QueueJob[], online = true): string[] {
  outbox.jobs = jobs;
  outbox.online = online;
  const html = renderToStaticMarkup(<QueueBanner />);
  return [...html.matchAll(/<p[^>]*>(.*?)<\/p>/g)].map((m) => m[1]!.replace(/<[^>]+>/g, ''));
}

async function speak(lng: Language) {
  await loadLanguage(lng);
  await setLanguage(lng);
}

describe('the outbox banner in English', () => {
  beforeEach(() => speak('en'));

  // Each expected line is the English a person would write for that outbox, by hand.
  it.each([
    ['one walk', [walk()], true, '1 walk waiting to send'],
    ['three walks', times(3, walk), true, '3 walks waiting to send'],
    ['one traced boundary', [outline()], true, '1 field outline waiting to send'],
    ['two traced boundaries, no signal', times(2, outline), false, 'No signal: 2 field outlines waiting to send'],
    ['two walks and a boundary', [walk(), outline(), walk()], true, '2 walks and 1 field outline waiting to send'],
    ['a walk and two boundaries, no signal', [outline(), walk(), outline()], false, 'No signal: 1 walk and 2 field outlines waiting to send'],
  ])('%s', (_case, jobs, online, line) => {
    expect(banner(jobs, online)[0]).toBe(line);
  });

  it('names what needs a person or a sign-in, with the verb agreeing with how many', () => {
    expect(banner([outline(needsPerson)])).toContain('1 field outline needs attention');
    expect(banner([walk(needsPerson), outline(needsPerson)])).toContain('1 walk and 1 field outline need attention');
    expect(banner([walk(needsPerson), walk(needsPerson)])).toContain('2 walks need attention');
    expect(banner([outline(needsSignIn)])).toContain('Sign in again to send 1 field outline Sign in');
    // Each line counts only its own jobs: one walk waits, one outline waits for a sign-in.
    expect(banner([walk(), outline(needsSignIn)])).toEqual(['1 walk waiting to send', 'Sign in again to send 1 field outline Sign in']);
  });

  it('says which arrived once the signal is back', () => {
    const note = (jobs: QueueJob[]) => renderToStaticMarkup(<SentNote jobs={jobs} onClose={() => undefined} />);
    expect(note([walk()])).toContain('The signal is back: the walk of North Flat reached the office.');
    expect(note([outline({}, 'Creek Bend')])).toContain('The signal is back: the field outline of Creek Bend reached the office.');
    expect(note([walk(), outline({}, 'Creek Bend')])).toContain(
      'The signal is back: 1 walk and 1 field outline reached the office (North Flat, Creek Bend).',
    );
  });
});

describe('the outbox details', () => {
  beforeEach(() => speak('en'));

  it('say which thing the office has under the same id, or refused: a walk or a field outline', () => {
    const refused = { state: 'attention' as const, attention: 'refused' as const, lastError: { status: 400, code: 'invalid', message: 'too few corners' } };
    const html = renderToStaticMarkup(
      <QueryClientProvider client={new QueryClient()}>
        <JobList jobs={[walk(needsPerson), outline(needsPerson), outline(refused)]} />
      </QueryClientProvider>,
    );
    expect(html).toContain('The office already has a different walk with the same id.');
    expect(html).toContain('The office already has a different field outline with the same id.');
    expect(html).toContain('The server did not accept this field outline (too few corners).');
    expect(html).not.toContain('did not accept this walk');
  });
});

describe('the outbox banner in Spanish', () => {
  beforeEach(() => speak('es'));

  it.each([
    ['un recorrido', [walk()], true, '1 recorrido en espera de envío'],
    ['un contorno', [outline()], true, '1 contorno de campo en espera de envío'],
    ['dos contornos sin señal', times(2, outline), false, 'Sin señal: 2 contornos de campo en espera de envío'],
    ['dos recorridos y un contorno', [walk(), walk(), outline()], true, '2 recorridos y 1 contorno de campo en espera de envío'],
  ])('%s', (_case, jobs, online, line) => {
    expect(banner(jobs, online)[0]).toBe(line);
  });

  it('names what needs a person, with the verb agreeing', () => {
    expect(banner([walk(needsPerson)])).toContain('1 recorrido necesita revisión');
    expect(banner([walk(needsPerson), outline(needsPerson), outline(needsPerson)])).toContain('1 recorrido y 2 contornos de campo necesitan revisión');
    expect(banner([outline(needsSignIn)])).toContain('Vuelve a entrar para enviar 1 contorno de campo Entrar');
  });

  it('says which arrived once the signal is back', () => {
    const note = (jobs: QueueJob[]) => renderToStaticMarkup(<SentNote jobs={jobs} onClose={() => undefined} />);
    expect(note([outline({}, 'Creek Bend')])).toContain('Volvió la señal: el contorno de Creek Bend llegó a la oficina.');
    expect(note([walk(), walk()])).toContain('Volvió la señal: 2 recorridos llegaron a la oficina (North Flat, North Flat).');
  });
});
