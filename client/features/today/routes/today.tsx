import { strings } from '../../../lib/strings';

/** Today's walks. Walk lists arrive with the walks issue; until then, the empty state. */
export function TodayRoute() {
  return (
    <section aria-labelledby="today-title">
      <h1 id="today-title" className="text-2xl font-bold">
        {strings.today.title}
      </h1>
      <div className="mt-4 rounded-xl border-2 border-dashed border-loam-300 bg-white px-5 py-8 text-center">
        <p className="text-xl font-bold">{strings.today.empty}</p>
        <p className="mt-2 text-loam-500">{strings.today.emptyHint}</p>
      </div>
      <p className="mt-5 border-l-4 border-straw bg-straw-50 px-4 py-3">{strings.today.caution}</p>
    </section>
  );
}
