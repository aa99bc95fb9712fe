import '../../../locales/screens';
import { useEffect, useMemo, useRef, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { useTranslation } from '../../../lib/i18n';
import { MAX_LENGTH_CM, MAX_PLANTS } from '../../../../shared/schemas/walks';
import { useFormat } from '../../session/public';
import { usePosition } from '../../../lib/use-position';
import { EstimatePanel, EstimateSummary } from '../../estimate/public';
import type { WalkDraft } from '../drafts';
import { acceptedLengthsCm, isSkipped, stopStates, type StopState } from '../draft-review';
import { WithDraft, type UpdateDraft } from '../components/with-draft';
import { useLiveEstimate } from '../use-live-estimate';
import { fromCm, QUESTION_ABOVE_CM, type LengthCheck } from '../validation';
import { PhotoButton } from '../components/photo-button';

/** One stop at a time: a big number, a big Next, the live estimate underneath. */
export default function EntryRoute() {
  const { walkId = '' } = useParams();
  return <WithDraft walkId={walkId}>{(draft, update) => <Entry draft={draft} update={update} />}</WithDraft>;
}

function Entry({ draft, update }: { draft: WalkDraft; update: UpdateDraft }) {
  const { t } = useTranslation();
  const f = useFormat();
  const navigate = useNavigate();
  const position = usePosition();
  const input = useRef<HTMLInputElement>(null);
  const [attempted, setAttempted] = useState(false);
  const [tooMany, setTooMany] = useState(false);
  const [askSkip, setAskSkip] = useState(false);
  const nextButton = useRef<HTMLButtonElement>(null);

  const states = useMemo(() => stopStates(draft), [draft]);
  const lengths = useMemo(() => acceptedLengthsCm(states), [states]);
  const live = useLiveEstimate(draft, lengths);

  const stop = draft.current;
  // A stored draft's current stop lies within its stops; if not, it reads as an empty stop.
  const state: StopState = states[stop - 1] ?? { stop, text: '', check: { kind: 'empty' }, accepted: false };
  const text = draft.values[stop] ?? '';
  const unitLabel = t(`units.${draft.unit}`);
  const inUnit = (cm: number) => `${f.num(fromCm(cm, draft.unit), 1)} ${unitLabel}`;
  const last = stop === draft.stopCount;

  useEffect(() => {
    setAttempted(false);
    setAskSkip(false);
    input.current?.focus();
  }, [stop]);

  function go(to: number) {
    update((d) => ({ ...d, current: Math.min(Math.max(1, to), d.stopCount) }));
  }

  function next() {
    setAttempted(true);
    if (state.check.kind === 'refused' || (state.check.kind === 'question' && !state.accepted)) {
      input.current?.focus();
      return;
    }
    // An empty stop is never passed silently: the sampler says it is skipped (or measures it).
    if (state.check.kind === 'empty' && !isSkipped(draft, stop)) {
      setAskSkip(true);
      return;
    }
    advance();
  }

  function skip() {
    setAskSkip(false);
    update((d) => ({ ...d, skipped: [...new Set([...(d.skipped ?? []), stop])].sort((a, b) => a - b) }));
    advance();
  }

  function advance() {
    const fix = position.state.kind === 'fix' ? position.state : null;
    update((d) => ({
      ...d,
      positions:
        fix && (d.values[stop] ?? '').trim() !== ''
          ? { ...d.positions, [stop]: { lat: fix.lat, lon: fix.lon, accuracyM: fix.accuracyM } }
          : d.positions,
      current: last ? d.current : d.current + 1,
    }));
    if (last) navigate(`/walks/${draft.id}/finish`);
  }

  // Confirming only keeps the value; Next moves on, so "Yes" then "Next" is one stop, never two.
  function confirm() {
    update((d) => ({ ...d, confirmed: { ...d.confirmed, [stop]: text } }));
    nextButton.current?.focus();
  }

  function addStop() {
    if (draft.stopCount >= MAX_PLANTS) {
      setTooMany(true);
      return;
    }
    update((d) => ({ ...d, stopCount: d.stopCount + 1, current: d.stopCount + 1 }));
  }

  return (
    <div>
      <nav className="flex items-center justify-between gap-2">
        <Link
          to={`/plantings/${draft.planting.plantingId}`}
          className="inline-flex min-h-touch items-center text-lg font-bold text-shoot underline underline-offset-4"
        >
          ← {t('entry.plan')}
        </Link>
        <Link to="/guide" className="inline-flex min-h-touch items-center rounded-lg border-2 border-loam-400 bg-white px-3 text-lg font-bold">
          {t('entry.guide')}
        </Link>
      </nav>
      <p className="mt-1 text-lg text-loam-600">
        {draft.planting.fieldName} · {draft.planting.ranchName}
      </p>
      <h1 className="text-3xl font-bold">{t('entry.stopOf', { n: stop, total: draft.stopCount })}</h1>
      {/* The verdict and biomass stay in sight while typing (the full panel is further down). */}
      <div className="sticky top-0 z-10 -mx-4 mt-2 bg-mist px-4 py-1">
        <EstimateSummary live={live} plants={lengths.length} f={f} />
      </div>

      <form
        className="mt-3"
        noValidate
        onSubmit={(e) => {
          e.preventDefault();
          next();
        }}
      >
        <label htmlFor="length" className="block text-xl font-bold">
          {t('entry.length')}
        </label>
        <div className="mt-1 flex items-center gap-3">
          <input
            ref={input}
            id="length"
            type="text"
            inputMode="decimal"
            enterKeyHint={last ? 'done' : 'next'}
            autoComplete="off"
            value={text}
            aria-describedby="length-unit length-help length-check"
            aria-invalid={attempted && state.check.kind === 'refused'}
            onChange={(e) => {
              const v = e.target.value;
              setAskSkip(false);
              update((d) => ({ ...d, values: { ...d.values, [stop]: v } }));
            }}
            className="min-h-20 w-full min-w-0 rounded-xl border-4 border-loam-400 bg-white px-4 text-5xl font-bold tabular-nums focus:border-shoot"
          />
          {/* The unit once, beside the number (read out with the field through aria-describedby). */}
          <span id="length-unit" className="shrink-0 text-3xl font-bold">
            {unitLabel}
          </span>
        </div>
        <p id="length-help" className="mt-1 text-loam-600">
          {t('entry.lengthHelp')}
        </p>
        <div id="length-check" aria-live="assertive">
          {attempted && <CheckMessage check={state.check} accepted={state.accepted} inUnit={inUnit} onConfirm={confirm} />}
          {askSkip && (
            <div role="alert" className="mt-2 rounded-lg border-l-8 border-straw-600 bg-straw-50 p-3">
              <p className="text-lg font-bold">{t('entry.skipAsk', { n: stop })}</p>
              <p>{t('entry.skipHelp')}</p>
              <div className="mt-2 grid gap-2">
                <button
                  type="button"
                  onClick={skip}
                  className="min-h-14 rounded-xl border-2 border-loam bg-white px-3 text-lg font-bold"
                >
                  {t('entry.skipYes', { n: stop })}
                </button>
                <button
                  type="button"
                  onClick={() => {
                    setAskSkip(false);
                    input.current?.focus();
                  }}
                  className="min-h-14 rounded-xl border-2 border-loam bg-white px-3 text-lg font-bold"
                >
                  {t('entry.skipNo')}
                </button>
              </div>
            </div>
          )}
        </div>

        <button
          ref={nextButton}
          type="submit"
          className="mt-3 min-h-16 w-full rounded-xl bg-shoot px-5 text-2xl font-bold text-white hover:bg-shoot-800"
        >
          {last ? t('entry.finish') : `${t('entry.next')} →`}
        </button>
      </form>

      <div className="mt-3 grid grid-cols-2 gap-2">
        <button
          type="button"
          onClick={() => go(stop - 1)}
          disabled={stop === 1}
          className="min-h-14 rounded-xl border-2 border-loam-400 bg-white px-3 text-lg font-bold disabled:opacity-40"
        >
          ← {t('entry.previous')}
        </button>
        <button type="button" onClick={addStop} className="min-h-14 rounded-xl border-2 border-loam-400 bg-white px-3 text-lg font-bold">
          + {t('entry.addStop')}
        </button>
      </div>
      {tooMany && <p className="mt-1 font-bold text-clay-700">{t('entry.maxStops')}</p>}

      <div className="mt-3">
        <PhotoButton
          walkId={draft.id}
          stop={stop}
          photo={draft.photos[stop]}
          f={f}
          onSaved={(p) => update((d) => ({ ...d, photos: { ...d.photos, [stop]: p } }))}
        />
        {draft.positions[stop] && <p className="mt-1 text-loam-600">📍 {t('entry.gps')}</p>}
      </div>

      <nav aria-label={t('entry.stops')} className="mt-4">
        <ol className="grid grid-cols-5 gap-2">
          {states.map((s) => {
            const filled = s.check.kind !== 'empty';
            const skipped = !filled && isSkipped(draft, s.stop);
            // The stop being typed is flagged only once Next was pressed on it.
            const flagged = filled && !s.accepted && (s.stop !== stop || attempted);
            const current = s.stop === stop;
            return (
              <li key={s.stop}>
                <button
                  type="button"
                  onClick={() => go(s.stop)}
                  aria-current={current ? 'step' : undefined}
                  aria-label={
                    filled
                      ? t('entry.stopChipDone', { n: s.stop, value: `${s.text} ${unitLabel}` })
                      : skipped
                        ? t('entry.stopChipSkipped', { n: s.stop })
                        : t('entry.stopChip', { n: s.stop })
                  }
                  className={`flex h-12 w-full items-center justify-center rounded-lg border-2 text-lg font-bold ${
                    current ? 'border-loam ring-4 ring-straw' : 'border-loam-300'
                  } ${flagged ? 'bg-clay text-white' : filled ? 'bg-shoot text-white' : skipped ? 'border-dashed bg-loam-100 text-loam-600 line-through' : 'bg-white'}`}
                >
                  {s.stop}
                </button>
              </li>
            );
          })}
        </ol>
      </nav>

      <div className="mt-4">
        <EstimatePanel live={live} lengthsCm={lengths} f={f} />
      </div>
      <p className="mt-2 text-center text-loam-600">✓ {t('entry.saved')}</p>
    </div>
  );
}

function CheckMessage(props: { check: LengthCheck; accepted: boolean; inUnit: (cm: number) => string; onConfirm: () => void }) {
  const { t } = useTranslation();
  const { check } = props;
  if (check.kind === 'refused') {
    return (
      <p role="alert" className="mt-2 rounded-lg border-l-8 border-clay bg-clay-50 p-3 text-lg font-bold text-clay-800">
        {check.reason === 'too_long' ? t('entry.refused.too_long', { max: props.inUnit(MAX_LENGTH_CM) }) : t(`entry.refused.${check.reason}`)}
      </p>
    );
  }
  if (check.kind !== 'question') return null;
  if (props.accepted) return <p className="mt-2 text-lg text-loam-700">{t('entry.confirmed')}</p>;
  return (
    <div role="alert" className="mt-2 rounded-lg border-l-8 border-straw-600 bg-straw-50 p-3">
      {check.reasons.map((r) => (
        <p key={r} className="text-lg font-bold">
          {r === 'very_long'
            ? t('entry.question.very_long', { limit: props.inUnit(QUESTION_ABOVE_CM) })
            : t('entry.question.far_from_others', { median: props.inUnit(check.medianCm ?? 0) })}
        </p>
      ))}
      <p className="text-lg">{t('entry.questionAsk')}</p>
      <button
        type="button"
        onClick={props.onConfirm}
        className="mt-2 min-h-14 w-full rounded-xl border-2 border-loam bg-white px-4 text-lg font-bold"
      >
        {t('entry.confirm')}
      </button>
    </div>
  );
}
