import { useCallback, useRef, useState } from 'react';

export interface ActionState<R> {
  pending: boolean;
  done: boolean;
  data: R | undefined;
  error: Error | null;
}

/**
 * A button's async action with its pending, done and error states. The first screen's two
 * actions (sign out, save language or units) use this instead of TanStack's mutations, which keeps
 * the mutation observer out of the first screen's code.
 */
export function useAction<A extends unknown[], R>(fn: (...args: A) => Promise<R>) {
  const [state, setState] = useState<ActionState<R>>({ pending: false, done: false, data: undefined, error: null });
  const latest = useRef(fn);
  latest.current = fn;
  const run = useCallback((...args: A) => {
    setState((s) => ({ ...s, pending: true, error: null }));
    latest.current(...args).then(
      (data) => setState({ pending: false, done: true, data, error: null }),
      (err: unknown) => setState({ pending: false, done: false, data: undefined, error: err instanceof Error ? err : new Error(String(err)) }),
    );
  }, []);
  return { ...state, run };
}
