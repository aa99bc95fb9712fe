import '../../../locales/screens';
import { useMemo, useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { useTranslation } from '../../../lib/i18n';
import { useFormat } from '../../session/public';
import { enqueueWalk } from '../../offline/public';
import { EstimatePanel } from '../../estimate/public';
import { DEFAULT_STOPS, removeDraft, type WalkDraft } from '../drafts';
import { acceptedLengthsCm, reviewDraft, stopStates } from '../draft-review';
import { WithDraft, type UpdateDraft } from '../components/with-draft';
import { useRuleSettings } from '../../../lib/use-rule-settings';
import { useLiveEstimate } from '../use-live-estimate';
import { STAGES } from '../stages';

/** Check and send: the estimate, every plant, stage and notes, then into the outbox. */
export default function FinishRoute() {
  const { walkId = '' } = useParams();
  return <WithDraft walkId={walkId}>{(draft, update) => <Finish draft={draft} update={update} />}</WithDraft>;
}

function Finish({ draft, update }: { draft: WalkDraft; update: UpdateDraft }) {
  const { t } = useTranslation();
  const f = useFormat();
  const navigate = useNavigate();
  const states = useMemo(() => stopStates(draft), [draft]);
  const lengths = useMemo(() => acceptedLengthsCm(states), [states]);
  const live = useLiveEstimate(draft, lengths);
  const minPlants = useRuleSettings()?.minPlants ?? DEFAULT_STOPS;
  const review = useMemo(() => reviewDraft(draft, states), [draft, states]);
  const [sending, setSending] = useState(false);
  const [failed, setFailed] = useState<string | null>(null);
  const unitLabel = t(`units.${draft.unit}`);
  const n = review.body.plants.length;
  const canSend = n > 0 && review.needCheck.length === 0 && !sending;
  const stage = STAGES.find((s) => s.code === draft.stage);

  async function send() {
    if (!canSend) return;
    setSending(true);
    setFailed(null);
    try {
      const photos = Object.entries(draft.photos)
        .map(([stop, p]) => ({ stop: Number(stop), key: p.key }))
        .filter((p) => review.body.plants.some((pl) => pl.stop === p.stop));
      await enqueueWalk({
        body: review.body,
        userId: draft.userId,
        photos,
        label: { fieldName: draft.planting.fieldName, ranchName: draft.planting.ranchName },
        now: Date.now(),
      });
      // The outbox has it (saved first); only now may the draft go.
      await removeDraft(draft.id);
      navigate(`/walks/${draft.id}/sent`, { replace: true });
    } catch (err) {
      setFailed(err instanceof Error ? err.message : String(err));
      setSending(false);
    }
  }

  return (
    <div>
      <Link
        to={`/walks/${draft.id}`}
        className="inline-flex min-h-touch items-center text-lg font-bold text-shoot underline underline-offset-4"
      >
        ← {t('finish.back')}
      </Link>
      <h1 className="mt-1 text-3xl font-bold">{t('finish.title')}</h1>
      <p className="text-lg text-loam-600">
        {draft.planting.fieldName} · {draft.planting.ranchName} · {f.date(draft.walkedOn)}
      </p>

      <div className="mt-3">
        <EstimatePanel live={live} lengthsCm={lengths} f={f} />
      </div>

      <h2 className="mt-5 text-xl font-bold">{t('finish.plants')}</h2>
      <ol className="mt-2 grid grid-cols-2 gap-2">
        {states.map((s) => {
          const bad = s.check.kind !== 'empty' && !s.accepted;
          return (
            <li key={s.stop}>
              <button
                type="button"
                onClick={() => {
                  update((d) => ({ ...d, current: s.stop }));
                  navigate(`/walks/${draft.id}`);
                }}
                className={`flex min-h-14 w-full items-center justify-between gap-2 rounded-lg border-2 px-3 text-left text-lg ${
                  bad ? 'border-clay bg-clay-50 font-bold text-clay-800' : 'border-loam-300 bg-white'
                }`}
              >
                <span className="font-bold">{s.stop}</span>
                <span className="flex flex-col items-end leading-tight">
                  <span className="tabular-nums">
                    {s.check.kind !== 'empty' ? (
                      `${s.text} ${unitLabel}`
                    ) : review.skipped.includes(s.stop) ? (
                      <span className="text-loam-500">{t('finish.skippedMark')}</span>
                    ) : (
                      <span className="text-loam-500">{t('finish.noLength')}</span>
                    )}
                  </span>
                  {draft.photos[s.stop] && <span className="text-sm font-bold text-sky-700">{t('finish.withPhoto')}</span>}
                </span>
              </button>
            </li>
          );
        })}
      </ol>

      <div className="mt-3 space-y-1 text-lg" aria-live="polite">
        {n === 0 && <p className="font-bold text-clay-800">{t('finish.noPlants')}</p>}
        {review.needCheck.length > 0 && (
          <p className="font-bold text-clay-800">
            {t('finish.needCheck', { count: review.needCheck.length, stops: review.needCheck.join(', ') })}
          </p>
        )}
        {review.empty.length > 0 && n > 0 && (
          <p>{t('finish.empty', { count: review.empty.length, stops: review.empty.join(', ') })}</p>
        )}
        {review.skipped.length > 0 && (
          <p>{t('finish.skipped', { count: review.skipped.length, stops: review.skipped.join(', ') })}</p>
        )}
        {n > 0 && n < minPlants && <p>{t('finish.few', { count: n, usual: minPlants })}</p>}
      </div>

      <div className="mt-5">
        <label htmlFor="stage" className="block text-xl font-bold">
          {t('finish.stage')}
        </label>
        <p id="stage-help" className="text-loam-600">
          {t('finish.stageHelp')}
        </p>
        <select
          id="stage"
          aria-describedby="stage-help"
          value={draft.stage ?? ''}
          onChange={(e) => {
            const v = e.target.value;
            update((d) => ({ ...d, stage: v === '' ? null : v }));
          }}
          className="mt-1 min-h-14 w-full rounded-lg border-2 border-loam-400 bg-white px-3 text-lg"
        >
          <option value="">{t('finish.stageNone')}</option>
          {STAGES.map((s) => (
            <option key={s.code} value={s.code}>
              {s.code} · Feekes {s.feekes} — {t(`stages.${s.code}`)}
            </option>
          ))}
        </select>
        {stage && (
          <p className="mt-1 text-lg" data-testid="stage-chosen">
            <span className="font-bold">
              {stage.code} · Feekes {stage.feekes}
            </span>
            : {t(`stages.${stage.code}`)}
          </p>
        )}
      </div>

      <div className="mt-4">
        <label htmlFor="notes" className="block text-xl font-bold">
          {t('finish.notes')}
        </label>
        <textarea
          id="notes"
          rows={3}
          maxLength={2000}
          value={draft.notes}
          onChange={(e) => {
            const v = e.target.value;
            update((d) => ({ ...d, notes: v }));
          }}
          className="mt-1 w-full rounded-lg border-2 border-loam-400 bg-white p-3 text-lg"
        />
      </div>

      {failed && (
        <p role="alert" className="mt-3 rounded-lg border-l-8 border-clay bg-clay-50 p-3 font-bold text-clay-800">
          {t('finish.failed', { message: failed })}
        </p>
      )}
      <button
        type="button"
        onClick={() => void send()}
        disabled={!canSend}
        className="mt-4 min-h-16 w-full rounded-xl bg-shoot px-5 text-2xl font-bold text-white hover:bg-shoot-800 disabled:opacity-50"
      >
        {sending ? t('finish.sending') : t('finish.send')}
      </button>
    </div>
  );
}
