import { useEffect, useState } from 'react';
import type { Fix } from '../lib/reading';

export type LocationState =
  | { status: 'off' }
  | { status: 'waiting' }
  | { status: 'on'; fix: Fix; at: Date }
  | { status: 'denied' }
  | { status: 'unavailable'; message: string };

/**
 * The phone's position while `active`: the browser's watchPosition with high accuracy and no cached
 * fixes. Nothing is sent anywhere; the position stays in the page.
 */
export function useGeolocation(active: boolean): LocationState {
  const [state, setState] = useState<LocationState>({ status: 'off' });
  useEffect(() => {
    if (!active) {
      setState({ status: 'off' });
      return;
    }
    if (typeof navigator === 'undefined' || !navigator.geolocation) {
      setState({ status: 'unavailable', message: 'This browser cannot give a position.' });
      return;
    }
    setState({ status: 'waiting' });
    const id = navigator.geolocation.watchPosition(
      (p) =>
        setState({
          status: 'on',
          fix: { latitude: p.coords.latitude, longitude: p.coords.longitude, accuracy: p.coords.accuracy },
          at: new Date(p.timestamp),
        }),
      (e) => {
        if (e.code === e.PERMISSION_DENIED) setState({ status: 'denied' });
        else if (e.code === e.TIMEOUT) setState((s) => (s.status === 'on' ? s : { status: 'waiting' }));
        else
          setState({
            status: 'unavailable',
            message: 'The phone cannot find its position here just now (under cover, or location switched off).',
          });
      },
      { enableHighAccuracy: true, maximumAge: 0, timeout: 30_000 },
    );
    return () => navigator.geolocation.clearWatch(id);
  }, [active]);
  return state;
}
