import { useCallback, useEffect, useRef, useState } from 'react';

export type PositionState =
  | { kind: 'off' }
  | { kind: 'locating' }
  | { kind: 'denied' }
  | { kind: 'unavailable' }
  | { kind: 'fix'; lat: number; lon: number; accuracyM: number; at: number };

/**
 * The phone's position while a screen is open, when the sampler allows it. Starts by itself if
 * the permission was already given; otherwise waits for the button (a prompt out of nowhere is
 * refused more often, and some phones need the tap).
 */
export function usePosition() {
  const [state, setState] = useState<PositionState>({ kind: 'off' });
  const watch = useRef<number | null>(null);

  const start = useCallback(() => {
    if (!('geolocation' in navigator)) {
      setState({ kind: 'unavailable' });
      return;
    }
    if (watch.current !== null) return;
    setState((s) => (s.kind === 'fix' ? s : { kind: 'locating' }));
    watch.current = navigator.geolocation.watchPosition(
      (p) => setState({ kind: 'fix', lat: p.coords.latitude, lon: p.coords.longitude, accuracyM: p.coords.accuracy, at: p.timestamp }),
      (err) => {
        if (err.code === err.PERMISSION_DENIED) {
          if (watch.current !== null) navigator.geolocation.clearWatch(watch.current);
          watch.current = null;
          setState({ kind: 'denied' });
        } else setState((s) => (s.kind === 'fix' ? s : { kind: 'unavailable' }));
      },
      { enableHighAccuracy: true, maximumAge: 10_000, timeout: 30_000 },
    );
  }, []);

  useEffect(() => {
    let live = true;
    navigator.permissions
      ?.query({ name: 'geolocation' })
      .then((p) => {
        if (live && p.state === 'granted') start();
      })
      .catch(() => undefined);
    return () => {
      live = false;
      if (watch.current !== null) navigator.geolocation.clearWatch(watch.current);
      watch.current = null;
    };
  }, [start]);

  return { state, start };
}
