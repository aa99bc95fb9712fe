import '../../../locales/screens';
import { useMemo, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { useQuery, useQueryClient } from '@tanstack/react-query';
import { useTranslation } from '../../../lib/i18n';
import type { TodayItem } from '../../../../shared/schemas/walks';
import { localIsoDate } from '../../../lib/format';
import { newWalkId } from '../../../lib/storage';
import { useFormat, useUser } from '../../session/public';
import { todayQuery } from '../../today/public';
import { DEFAULT_STOPS, listDrafts, newDraft, saveDraft, type WalkDraft } from '../../entry/public';
import { useRuleSettings } from '../../../lib/use-rule-settings';
import { newWalkSeed, suggestStops } from '../../../../shared/calc/walk-plan';
import { clearPendingSeed, pendingSeed, setPendingSeed } from '../plan-seed';
import { planLines, stopSteps } from '../plan-words';
import { FieldMap } from '../components/field-map';
import { distanceM, distanceToFieldM, FAR_FROM_FIELD_M, planField } from '../field-plan';
import { usePosition } from '../../../lib/use-position';

const PACE_M = 0.76; // as the walk plan (shared/calc/walk-plan.ts, PACE_LENGTH_M)

/** The walk plan of one planting: outline, diagonal, numbered stops, distances, where I am. */
export default function PlanRoute() {
  const { plantingId = '' } = useParams();
  const { t } = useTranslation();
  const user = useUser();
  const today = useQuery(todayQuery(user.id));
  const item = today.data?.items.find((i) => i.plantingId === plantingId);
  const drafts = useQuery({ queryKey: ['drafts', user.id], queryFn: () => listDrafts(user.id), networkMode: 'always', staleTime: 0, gcTime: 0 });

  if (!item) {
    return (
      <div>
        <BackToday />
        <p className="mt-4 text-lg">{today.isPending ? t('app.loading') : t('plan.notFound')}</p>
      </div>
    );
  }
  const draft = drafts.data?.find((d) => d.planting.plantingId === plantingId) ?? null;
  if (drafts.isPending) return <p className="text-lg">{t('app.loading')}</p>;
  return <Plan item={item} draft={draft} />;
}

function BackToday() {
  const { t } = useTranslation();
  return (
    <Link to="/" className="inline-flex min-h-touch items-center text-lg font-bold text-shoot underline underline-offset-4">
      ← {t('plan.backToday')}
    </Link>
  );
}

function Plan({ item, draft }: { item: TodayItem; draft: WalkDraft | null }) {
  const { t } = useTranslation();
  const f = useFormat();
  const user = useUser();
  const navigate = useNavigate();
  const qc = useQueryClient();
  const rule = useRuleSettings();
  const minPlants = rule?.minPlants ?? DEFAULT_STOPS;
  const edgeMarginM = rule?.edgeMarginM ?? 10;
  const draftId = draft?.id ?? null;
  const draftValues = draft?.values ?? {};
  const stops = draft?.stopCount ?? minPlants;
  // The seed the stops are drawn from: the walk's own once started, else one kept for this planting.
  const [pending, setPending] = useState(() => pendingSeed(user.id, item.plantingId));
  const seed = draft?.planSeed ?? pending;
  const result = useMemo(
    () => planField(item.boundary, item.areaHa, stops, { edgeMarginM, seed }),
    [item.boundary, item.areaHa, stops, edgeMarginM, seed],
  );
  const { plan } = result;
  const started = Object.values(draftValues).some((v) => v.trim() !== '');
  const [redrawn, setRedrawn] = useState(false);
  const steps = useMemo(() => stopSteps(plan), [plan]);
  const suggestion = useMemo(() => suggestStops(item.areaHa, minPlants), [item.areaHa, minPlants]);

  async function redraw() {
    const next = newWalkSeed();
    if (draft) {
      await saveDraft({ ...draft, planSeed: next, updatedAt: Date.now() });
      await qc.invalidateQueries({ queryKey: ['drafts', user.id] });
    } else setPending(setPendingSeed(user.id, item.plantingId, next));
    setRedrawn(true);
  }
  const position = usePosition();
  const [starting, setStarting] = useState(false);

  const nextStop = plan.stops.find((s) => !(draftValues[s.index] ?? '').trim()) ?? null;
  const fix = position.state.kind === 'fix' ? position.state : null;
  const toField = fix ? distanceToFieldM(result, fix) : null;
  const far = toField !== null && toField > FAR_FROM_FIELD_M;
  const toNext =
    fix && !far && nextStop && nextStop.lat !== null && nextStop.lng !== null ? distanceM(fix.lat, fix.lon, nextStop.lat, nextStop.lng) : null;

  async function start() {
    if (draftId) {
      navigate(`/walks/${draftId}`);
      return;
    }
    setStarting(true);
    const fresh = newDraft({
      id: newWalkId(),
      userId: user.id,
      planting: {
        plantingId: item.plantingId,
        fieldName: item.fieldName,
        ranchName: item.ranchName,
        crop: item.crop,
        variety: item.variety,
        calibrationId: item.calibrationId,
        areaHa: item.areaHa,
      },
      unit: user.units === 'metric' ? 'cm' : 'in',
      walkedOn: localIsoDate(),
      now: Date.now(),
      stopCount: stops,
      planSeed: seed,
    });
    await saveDraft(fresh);
    clearPendingSeed(user.id, item.plantingId);
    navigate(`/walks/${fresh.id}`);
  }

  const crop = t(`crops.${item.crop}` as 'crops.other', { defaultValue: item.crop });
  return (
    <div>
      <BackToday />
      <h1 className="mt-2 text-3xl font-bold">{item.fieldName}</h1>
      <p className="text-lg text-loam-600">
        {item.ranchName} · {crop}
        {item.variety ? ` · ${item.variety}` : ''} · {t('plan.area', { area: f.area(item.areaHa) })}
      </p>
      <h2 className="sr-only">{t('plan.title')}</h2>

      <div className="mt-3">
        <FieldMap boundary={item.boundary} result={result} nextStop={nextStop?.index ?? null} here={far ? null : fix} />
      </div>

      <div className="mt-3 space-y-1 text-lg" data-testid="plan-summary">
        <p className="font-bold">{t('plan.summary', { count: plan.stops.length, length: f.distance(plan.diagonalM) })}</p>
        {plan.legs.length > 1 && <p>{t('plan.route', { length: f.distance(plan.walkLengthM) })}</p>}
        {plan.legs.length === 1 && plan.stops.length > 1 && (
          <p>{t('plan.spacing', { paces: f.num(plan.spacingPaces), dist: f.distance(plan.spacingM) })}</p>
        )}
        <p>{t('plan.margin', { dist: f.distance(plan.edgeMarginM) })}</p>
        {planLines(plan.noteParts).map((line) => (
          <p key={line.key} data-testid="plan-pattern">
            {line.key === 'plan.marginReduced'
              ? t(line.key, { asked: f.distance(line.askedM), used: f.distance(line.usedM) })
              : t(line.key, { stops: line.stops, legs: 'legs' in line ? line.legs : 1 })}
          </p>
        ))}
        {plan.mode === 'area' && <p className="text-loam-600">{result.boundaryProblem ? t('plan.badBoundary') : t('plan.noBoundary')}</p>}
        {!item.boundary && (
          <div className="rounded-xl border-2 border-loam-200 bg-white p-3">
            <p className="text-loam-700">{t('trace.linkHint')}</p>
            <Link to={`/plantings/${item.plantingId}/trace`} className="mt-2 inline-flex min-h-touch items-center text-lg font-bold text-shoot underline underline-offset-4">
              {t('trace.link')} →
            </Link>
          </div>
        )}
        {!draft && suggestion.suggested > suggestion.minimum && (
          <p className="text-loam-600">{t('plan.suggest', { min: suggestion.minimum, n: suggestion.suggested })}</p>
        )}
        <p className="text-loam-600">{t('plan.random')}</p>
      </div>
      {!started && (
        <div className="mt-2">
          <button
            type="button"
            onClick={() => void redraw()}
            className="min-h-touch w-full rounded-xl border-2 border-loam-400 bg-white px-4 text-lg font-bold"
          >
            ↻ {t('plan.redraw')}
          </button>
          {redrawn && (
            <p className="mt-1 text-loam-700" role="status">
              {t('plan.redrawn')}
            </p>
          )}
        </div>
      )}

      <div className="mt-3 rounded-xl border-2 border-sky-200 bg-sky-50 p-3 text-sky-900">
        {fix ? (
          <>
            {far && toField !== null ? (
              <p className="text-xl font-bold" data-testid="far-from-field">
                {t('plan.far', { dist: farDistance(toField, f.us, f.num) })}
              </p>
            ) : toNext !== null && nextStop ? (
              <p className="text-xl font-bold">
                {t('plan.toNext', { n: nextStop.index, dist: f.distance(toNext), paces: f.num(toNext / PACE_M) })}
              </p>
            ) : (
              <p className="text-lg font-bold">{t('plan.here')}</p>
            )}
            <p>{t('plan.accuracy', { dist: f.distance(fix.accuracyM) })}</p>
          </>
        ) : position.state.kind === 'denied' ? (
          <p>{t('plan.locationDenied')}</p>
        ) : position.state.kind === 'unavailable' ? (
          <p>{t('plan.locationUnavailable')}</p>
        ) : (
          <button
            type="button"
            onClick={position.start}
            disabled={position.state.kind === 'locating'}
            className="min-h-touch w-full rounded-lg border-2 border-sky-600 bg-white px-4 text-lg font-bold text-sky-800"
          >
            {position.state.kind === 'locating' ? t('plan.locating') : t('plan.locate')}
          </button>
        )}
      </div>

      <div className="mt-4 grid gap-3">
        <button
          type="button"
          onClick={() => void start()}
          disabled={starting}
          className="min-h-16 rounded-xl bg-shoot px-5 text-2xl font-bold text-white hover:bg-shoot-800 disabled:opacity-70"
        >
          {draftId ? t('plan.continueWalk') : t('plan.startWalk')}
        </button>
        <Link
          to="/guide"
          className="flex min-h-14 items-center justify-center rounded-xl border-2 border-loam-400 bg-white px-5 text-xl font-bold"
        >
          {t('plan.guide')}
        </Link>
      </div>

      <h2 className="mt-6 text-xl font-bold">{t('plan.stopsTitle')}</h2>
      <ol className="mt-2 divide-y-2 divide-loam-100 rounded-xl border-2 border-loam-200 bg-white">
        {plan.stops.map((s, k) => {
          const step = steps[k]!; // one step per stop
          const dist = { paces: f.num(step.distanceM / PACE_M), dist: f.distance(step.distanceM) };
          return (
            <li key={s.index} className="flex items-center gap-3 px-3 py-2">
              <span
                className={`flex size-11 shrink-0 items-center justify-center rounded-full border-2 border-loam text-lg font-bold ${
                  s.index === nextStop?.index ? 'bg-straw' : 'bg-white'
                }`}
                aria-hidden="true"
              >
                {s.index}
              </span>
              <span className="text-lg">
                <span className="sr-only">{t('plan.stop', { n: s.index })}: </span>
                {step.kind === 'first'
                  ? t('plan.firstStop', dist)
                  : step.kind === 'new_leg'
                    ? t('plan.legStart', { ...dist, leg: step.leg })
                    : t('plan.fromPrevious', { ...dist, prev: step.prev })}
              </span>
            </li>
          );
        })}
      </ol>
      <p className="mt-2 text-loam-600">{t('plan.pace', { dist: f.us ? `${f.num(PACE_M / 0.3048, 1)} ${t('units.ft')}` : `${f.num(PACE_M, 2)} ${t('units.m')}` })}</p>
    </div>
  );
}

/** "42 mi (68 km)" in US units, "68 km" in metric: whole numbers from 10 on, one decimal below. */
function farDistance(m: number, us: boolean, num: (x: number, digits?: number) => string): string {
  const km = m / 1000;
  const mi = m / 1609.344; // the international mile
  const show = (x: number) => num(x, x < 10 ? 1 : 0);
  return us ? `${show(mi)} mi (${show(km)} km)` : `${show(km)} km`;
}
