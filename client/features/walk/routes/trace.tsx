import '../../../locales/screens';
import { useEffect, useMemo, useRef, useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { useQuery } from '@tanstack/react-query';
import { del, get, set } from 'idb-keyval';
import { useTranslation } from '../../../lib/i18n';
import { newWalkId, traceStore } from '../../../lib/storage';
import { useFormat, useUser } from '../../session/public';
import { todayQuery } from '../../today/public';
import { sendBoundary, useOnline, useQueueJobs } from '../../offline/public';
import { TRACE_CLOSE_M, TRACE_MAX_ACCURACY_M, closingGapM, keepFix, tracedLengthM, tracedOutline, type TracePoint } from '../../../../shared/registry/trace';
import { boundaryOutline } from '../../../../shared/registry/outline';

/** A boundary being traced, kept in IndexedDB at every position so a closed tab or flat battery loses nothing. */
interface Trace {
  id: string;
  fieldId: string;
  points: TracePoint[];
}

type Gps = { kind: 'idle' } | { kind: 'waiting'; accuracyM: number | null } | { kind: 'denied' } | { kind: 'unavailable' };

/** Walk a field's edge with location on; the outline goes through the outbox for the office to accept. */
export default function TraceRoute() {
  const { plantingId = '' } = useParams();
  const { t } = useTranslation();
  const f = useFormat();
  const user = useUser();
  const today = useQuery(todayQuery(user.id));
  const item = today.data?.items.find((i) => i.plantingId === plantingId);
  const key = item ? `${user.id}:${item.fieldId}` : null;
  const [trace, setTrace] = useState<Trace | null>(null);
  const [loaded, setLoaded] = useState(false);
  const [recording, setRecording] = useState(false);
  const [gps, setGps] = useState<Gps>({ kind: 'idle' });
  // Finish tapped (and not carried on since): the outline is closed, ready to send or refused.
  const [finished, setFinished] = useState(false);
  // The outbox job of the outline sent from this screen.
  const [sentId, setSentId] = useState<string | null>(null);
  const sentJob = useQueueJobs().find((j) => j.id === sentId);
  const online = useOnline();
  const [lastAccuracy, setLastAccuracy] = useState<number | null>(null);
  const watch = useRef<number | null>(null);
  const latest = useRef<Trace | null>(null);

  useEffect(() => {
    if (!key || !item) return;
    void get<Trace>(key, traceStore()).then((stored) => {
      const tr = stored ?? { id: newWalkId(), fieldId: item.fieldId, points: [] };
      latest.current = tr;
      setTrace(tr);
      setLoaded(true);
    });
  }, [key, item]);

  const stop = () => {
    if (watch.current !== null) navigator.geolocation.clearWatch(watch.current);
    watch.current = null;
    setRecording(false);
  };
  useEffect(() => stop, []);

  function start() {
    if (!('geolocation' in navigator)) {
      setGps({ kind: 'unavailable' });
      return;
    }
    setRecording(true);
    setFinished(false);
    setGps({ kind: 'waiting', accuracyM: null });
    watch.current = navigator.geolocation.watchPosition(
      (p) => {
        const fix: TracePoint = { lat: p.coords.latitude, lon: p.coords.longitude, accuracyM: p.coords.accuracy };
        setLastAccuracy(fix.accuracyM);
        setGps(fix.accuracyM > TRACE_MAX_ACCURACY_M ? { kind: 'waiting', accuracyM: fix.accuracyM } : { kind: 'idle' });
        const cur = latest.current;
        if (!cur || !key || !keepFix(cur.points[cur.points.length - 1] ?? null, fix)) return;
        const next = { ...cur, points: [...cur.points, fix] };
        latest.current = next;
        setTrace(next);
        void set(key, next, traceStore());
      },
      (err) => {
        if (err.code === err.PERMISSION_DENIED) {
          stop();
          setGps({ kind: 'denied' });
        } else setGps({ kind: 'unavailable' });
      },
      { enableHighAccuracy: true, maximumAge: 0, timeout: 30_000 },
    );
  }

  function finish() {
    stop();
    setFinished(true);
  }

  async function discard() {
    stop();
    setFinished(false);
    if (!key || !item) return;
    await del(key, traceStore());
    const fresh = { id: newWalkId(), fieldId: item.fieldId, points: [] };
    latest.current = fresh;
    setTrace(fresh);
  }

  const points = trace?.points ?? [];
  const outline = useMemo(() => (points.length >= 3 ? tracedOutline(points) : null), [points]);

  async function send() {
    if (!item || !trace || !outline?.ok || !key) return;
    stop();
    await sendBoundary({
      fieldId: item.fieldId,
      userId: user.id,
      label: { fieldName: item.fieldName, ranchName: item.ranchName },
      now: Date.now(),
      body: { id: trace.id, boundary: outline.boundary, pointsRecorded: outline.pointsRecorded, medianAccuracyM: outline.medianAccuracyM },
    });
    await del(key, traceStore());
    setSentId(trace.id);
  }

  const back = (
    <Link to={`/plantings/${plantingId}`} className="inline-flex min-h-touch items-center text-lg font-bold text-shoot underline underline-offset-4">
      ← {t('trace.back')}
    </Link>
  );
  if (!item) return <div>{back}<p className="mt-4 text-lg">{today.isPending ? t('app.loading') : t('plan.notFound')}</p></div>;
  if (item.boundary) return <div>{back}<p className="mt-4 text-lg">{t('trace.hasBoundary')}</p></div>;
  if (!loaded) return <p className="text-lg">{t('app.loading')}</p>;
  if (sentId) {
    // Where the outline is now: waiting in the outbox, at the office, or held for a person.
    const state =
      sentJob?.state === 'done'
        ? t('trace.arrived')
        : sentJob?.state === 'attention'
          ? t('trace.held')
          : sentJob?.attention === 'signin'
            ? t('trace.signin')
            : online
              ? t('trace.waiting')
              : t('trace.waitingOffline');
    return (
      <div>
        {back}
        <div role="status" className="mt-4 rounded-xl border-4 border-shoot bg-shoot-50 p-4" data-testid="trace-sent">
          <p className="text-xl font-bold">{t('trace.sent')}</p>
          <p className="mt-2 text-lg" data-testid="trace-sent-state">
            {state}
          </p>
        </div>
      </div>
    );
  }

  const gap = closingGapM(points);
  const big = 'min-h-touch w-full rounded-xl px-4 text-xl font-bold';
  return (
    <div>
      {back}
      <h1 className="mt-2 text-3xl font-bold">{t('trace.title')}</h1>
      <p className="text-lg text-loam-600">
        {item.fieldName} · {item.ranchName} · {t('trace.entered', { area: f.area(item.areaHa) })}
      </p>
      <p className="mt-2 text-lg">{t('trace.how')}</p>

      <div className="mt-3">
        <TraceDrawing points={points} />
      </div>

      <div className="mt-3 space-y-1 text-lg" data-testid="trace-summary" aria-live="polite">
        <p className="font-bold">
          {recording
            ? t('trace.recording')
            : finished
              ? outline?.ok
                ? t('trace.finished')
                : t('trace.finishedNotReady')
              : points.length
                ? t('trace.paused')
                : ''}{' '}
          {t('trace.points', { count: points.length })}
        </p>
        {points.length > 1 && <p>{t('trace.walked', { dist: f.distance(tracedLengthM(points)) })}</p>}
        {points.length > 1 && <p>{t('trace.gap', { dist: f.distance(gap) })}{gap > TRACE_CLOSE_M ? ` ${t('trace.closeHint')}` : ''}</p>}
        {outline?.ok && <p data-testid="trace-area">{t('trace.area', { area: f.area(outline.areaHa) })}</p>}
        {lastAccuracy !== null && gps.kind !== 'waiting' && <p className="text-loam-600">{t('trace.accuracy', { dist: f.distance(lastAccuracy) })}</p>}
        {gps.kind === 'waiting' && gps.accuracyM !== null && <p className="text-loam-700">{t('trace.poor', { dist: f.distance(gps.accuracyM) })}</p>}
        {gps.kind === 'denied' && <p role="alert" className="font-bold text-clay-800">{t('trace.denied')}</p>}
        {gps.kind === 'unavailable' && <p role="alert" className="font-bold text-clay-800">{t('trace.unavailable')}</p>}
      </div>

      <div className="mt-3 space-y-2">
        {recording ? (
          <button type="button" onClick={finish} className={`${big} border-2 border-loam-400 bg-white`}>
            {t('trace.finish')}
          </button>
        ) : (
          <button type="button" onClick={start} className={`${big} bg-shoot text-white`}>
            {points.length ? t('trace.resume') : t('trace.start')}
          </button>
        )}
        {!recording && points.length >= 3 && outline && (
          outline.ok ? (
            <div className="rounded-xl border-2 border-sky-200 bg-sky-50 p-3">
              <p className="text-xl font-bold" data-testid="trace-outline">
                {t('trace.outlineArea', { area: f.area(outline.areaHa), corners: outline.corners })}
              </p>
              <button type="button" onClick={() => void send()} className={`${big} mt-2 bg-shoot text-white`}>
                {t('trace.send')}
              </button>
            </div>
          ) : (
            <p role="alert" className="text-lg font-bold text-clay-800">
              {outline.problem === 'too_few_points' ? t('trace.tooFew') : outline.problem === 'no_area' ? t('trace.noArea') : t('trace.crosses')}
            </p>
          )
        )}
        {!recording && finished && points.length < 3 && (
          <p role="alert" className="text-lg font-bold text-clay-800">
            {t('trace.tooFew')}
          </p>
        )}
        {!recording && points.length > 0 && (
          <button type="button" onClick={() => void discard()} className="min-h-touch w-full rounded-xl px-4 text-lg font-bold text-clay-800 underline">
            {t('trace.discard')}
          </button>
        )}
      </div>
    </div>
  );
}

const W = 340;
const H = 260;

/** The path walked so far, north up (no map tiles: works offline). */
function TraceDrawing({ points }: { points: TracePoint[] }) {
  const { t } = useTranslation();
  if (points.length < 2) return <div className="h-24 rounded-xl border-2 border-dashed border-loam-300" aria-hidden="true" />;
  const ring = points.map((p) => [p.lon, p.lat]);
  const o = boundaryOutline({ type: 'Polygon', coordinates: [[...ring, ring[0]!]] }, { width: W, height: H, margin: 16 });
  const xy = points.map((p) => o.project(p.lon, p.lat));
  const d = xy.map((p, i) => `${i ? 'L' : 'M'}${p[0]} ${p[1]}`).join(' ');
  const [sx, sy] = xy[0]!;
  const [ex, ey] = xy[xy.length - 1]!;
  return (
    <svg viewBox={`0 0 ${W} ${H}`} className="h-auto w-full rounded-xl border-2 border-loam-200 bg-white" role="img" aria-label={t('trace.title')}>
      <path d={`${d} Z`} fill="#eef3fb" stroke="none" />
      <path d={d} fill="none" stroke="#2f5d8a" strokeWidth={3} strokeLinejoin="round" />
      <line x1={ex} y1={ey} x2={sx} y2={sy} stroke="#2f5d8a" strokeWidth={1.5} strokeDasharray="5 4" />
      <circle cx={sx} cy={sy} r={7} fill="#1f5f36" />
      <circle cx={ex} cy={ey} r={7} fill="#fff" stroke="#2f5d8a" strokeWidth={3} />
    </svg>
  );
}
