/**
 * When to try the outbox again without the sampler doing anything: the phone says the signal is
 * back ('online'), the app comes back to the screen ('visibilitychange' to visible), and every
 * `everyMs` as long as it runs, because a phone on a weak network often never fires 'online'.
 * Returns a function that stops all three.
 */
export interface ResendDeps {
  win: Pick<Window, 'addEventListener' | 'removeEventListener'>;
  doc: Pick<Document, 'addEventListener' | 'removeEventListener' | 'visibilityState'>;
  setInterval: (fn: () => void, ms: number) => unknown;
  clearInterval: (handle: unknown) => void;
}

export const RESEND_EVERY_MS = 30_000;

export function watchForSignal(
  onSignalMaybeBack: (why: 'online' | 'visible' | 'timer') => void,
  everyMs = RESEND_EVERY_MS,
  deps: ResendDeps = {
    win: window,
    doc: document,
    setInterval: (fn, ms) => window.setInterval(fn, ms),
    clearInterval: (h) => window.clearInterval(h as number),
  },
): () => void {
  const online = () => onSignalMaybeBack('online');
  const visible = () => {
    if (deps.doc.visibilityState === 'visible') onSignalMaybeBack('visible');
  };
  deps.win.addEventListener('online', online);
  deps.doc.addEventListener('visibilitychange', visible);
  const timer = deps.setInterval(() => onSignalMaybeBack('timer'), everyMs);
  return () => {
    deps.win.removeEventListener('online', online);
    deps.doc.removeEventListener('visibilitychange', visible);
    deps.clearInterval(timer);
  };
}
