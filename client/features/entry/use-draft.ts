import { useCallback, useEffect, useRef, useState } from 'react';
import { loadDraft, saveDraft, type WalkDraft } from './drafts';

/**
 * A walk in progress for a screen: loaded from IndexedDB, and every change written straight back
 * (saveDraft coalesces, so each keystroke is on the phone within milliseconds).
 */
export function useDraft(walkId: string) {
  const [draft, setDraft] = useState<WalkDraft | null | undefined>(undefined);
  const ref = useRef<WalkDraft | null | undefined>(undefined);

  useEffect(() => {
    let live = true;
    void loadDraft(walkId).then((d) => {
      if (!live) return;
      ref.current = d;
      setDraft(d);
    });
    return () => {
      live = false;
    };
  }, [walkId]);

  const update = useCallback((change: (d: WalkDraft) => WalkDraft) => {
    const current = ref.current;
    if (!current) return;
    const next = { ...change(current), updatedAt: Date.now() };
    ref.current = next;
    setDraft(next);
    void saveDraft(next);
  }, []);

  return { draft, update, loading: draft === undefined };
}
