import { describe, expect, it } from 'vitest';
import { watchForSignal } from '../../client/features/offline/resend';
import { only } from '../helpers/lists';

/** The outbox tries again on its own: signal back, app back on screen, and on a timer. */
function fakes() {
  const win = new EventTarget();
  const doc = Object.assign(new EventTarget(), { visibilityState: 'hidden' as DocumentVisibilityState });
  const timers: Array<{ fn: () => void; ms: number; cleared: boolean }> = [];
  return {
    win,
    doc,
    timers,
    deps: {
      win: win as unknown as Window,
      doc: doc as unknown as Document,
      setInterval: (fn: () => void, ms: number) => {
        const t = { fn, ms, cleared: false };
        timers.push(t);
        return t;
      },
      clearInterval: (h: unknown) => {
        (h as { cleared: boolean }).cleared = true;
      },
    },
  };
}

describe('watchForSignal', () => {
  it('tries on the online event, when the app becomes visible again, and every 30 s', () => {
    const f = fakes();
    const calls: string[] = [];
    const stop = watchForSignal((why) => calls.push(why), 30_000, f.deps);

    f.win.dispatchEvent(new Event('online'));
    f.doc.dispatchEvent(new Event('visibilitychange')); // hidden: the app went away, nothing to do
    f.doc.visibilityState = 'visible';
    f.doc.dispatchEvent(new Event('visibilitychange'));
    const timer = only(f.timers, 'timer');
    expect(timer.ms).toBe(30_000);
    timer.fn();
    expect(calls).toEqual(['online', 'visible', 'timer']);

    stop();
    f.win.dispatchEvent(new Event('online'));
    f.doc.dispatchEvent(new Event('visibilitychange'));
    expect(calls).toHaveLength(3);
    expect(timer.cleared).toBe(true);
  });
});
