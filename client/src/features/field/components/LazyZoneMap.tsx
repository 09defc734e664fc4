import { Component, lazy, Suspense, type ReactNode } from 'react';
import type { FieldPermit } from '@shared/schemas/field';
import type { Fix } from '../lib/reading';

/**
 * The map's code (Leaflet, about 47 KB gzip) loads after the phone view's first paint: the list of
 * permits needs none of it. A first open of /field fetches its files, without running them, once
 * the first scripts have come (`startPhoneDownloads`, features/field/index.ts); `preloadZoneMap`
 * imports it when the phone view first has a quiet moment (FieldLayout), so that once /field has
 * opened a permit's map opens with no signal even without a service worker, as before.
 */
const loadZoneMap = () => import('./ZoneMap');
let loading: ReturnType<typeof loadZoneMap> | null = null;
export function preloadZoneMap(): ReturnType<typeof loadZoneMap> {
  loading ??= loadZoneMap().catch((err: unknown) => {
    loading = null; // try again next time
    throw err;
  });
  return loading;
}

const ZoneMapLater = lazy(async () => ({ default: (await preloadZoneMap()).ZoneMap }));

/** When the map's code cannot load (no signal before it ever loaded): words instead, the rest of the page stays. */
class NoMap extends Component<{ children: ReactNode }, { failed: boolean }> {
  override state = { failed: false };
  static getDerivedStateFromError() {
    return { failed: true };
  }
  override render() {
    if (this.state.failed)
      return (
        <p role="status" className="rounded-md border-2 border-ink bg-sheet p-4 text-lg">
          The map has not loaded on this phone yet (no signal since the phone view was opened). Where you stand against the zones is worked
          out above without it.
        </p>
      );
    return this.props.children;
  }
}

export function ZoneMap({ permit, fix }: { permit: FieldPermit; fix: Fix | null }) {
  return (
    <NoMap>
      <Suspense fallback={<p className="text-lg">Loading the map…</p>}>
        <ZoneMapLater permit={permit} fix={fix} />
      </Suspense>
    </NoMap>
  );
}
