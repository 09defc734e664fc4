import { useEffect, useMemo, useRef, useState } from 'react';
import type { FieldPermit } from '@shared/schemas/field';
import { Button } from '@client/components/Button';
import { useUnits } from '@client/lib/units';
import { useGeolocation, type LocationState } from '../hooks/useGeolocation';
import { metres, prepareZones, readFix, sideText, type Fix, type Reading } from '../lib/reading';
import { clock } from '../lib/format';

const rememberKey = 'brink.field.showPosition';
function remembered(): boolean {
  try {
    return window.localStorage.getItem(rememberKey) === 'on';
  } catch {
    return false;
  }
}
function remember(on: boolean): void {
  try {
    window.localStorage.setItem(rememberKey, on ? 'on' : 'off');
  } catch {
    // Private mode: asked again next time.
  }
}

/** The phone's position while the operator has asked for it; started again on the next visit when allowed. */
function usePositionOnRequest() {
  const [active, setActive] = useState(false);
  useEffect(() => {
    if (!remembered() || !navigator.permissions?.query) return;
    navigator.permissions
      .query({ name: 'geolocation' })
      .then((p) => p.state === 'granted' && setActive(true))
      .catch(() => undefined);
  }, []);
  const location = useGeolocation(active);
  return {
    active,
    location,
    start: () => {
      remember(true);
      setActive(true);
    },
    stop: () => {
      remember(false);
      setActive(false);
    },
  };
}

const frame = {
  outside: 'border-safety-green',
  inside: 'border-safety-red',
  undecided: 'border-safety-yellow',
} as const;

function ReadingPanel({ reading, at }: { reading: Exclude<Reading, { kind: 'none' }>; at: Date }) {
  const ref = reading.excavation.reference;
  const units = useUnits();
  const headline =
    reading.kind === 'outside'
      ? 'Outside the exclusion zone'
      : reading.kind === 'inside'
        ? 'Inside the exclusion zone'
        : 'Cannot tell which side you are';
  return (
    <div className={`rounded-md border-l-[12px] border-2 bg-sheet p-4 ${frame[reading.kind]}`}>
      <p className="text-xl font-bold">{headline}</p>
      <p className="text-4xl font-bold leading-tight" data-testid="reading-figure">
        {sideText(reading.distance, units)}
      </p>
      <p>
        Nearest boundary: the exclusion zone of {ref} ({metres(reading.excavation.standoff ?? 0, units, 'up')} from its edge).
      </p>
      {reading.kind === 'undecided' ? (
        <p className="mt-2 font-semibold">
          The phone’s position is only good to ±{metres(reading.accuracy, units)}, more than the {metres(reading.distance, units)} between
          you and the line, so this reading cannot decide whether you are inside. Go by the marks on the ground and the banksman.
        </p>
      ) : (
        <p className="mt-2">Phone accuracy ±{metres(reading.accuracy, units)}.</p>
      )}
      <p className="text-lg text-ink-soft">Position at {clock(at)}; it follows you while this page is open.</p>
    </div>
  );
}

/**
 * Fills the screen while the reading says, beyond the phone's accuracy, that I am inside an
 * exclusion zone; vibrates once on the way in where the phone can. It can be folded to a bar to
 * look at the map, and opens again on the next way in.
 */
function InsideAlarm({ reading }: { reading: Exclude<Reading, { kind: 'none' }> }) {
  const [folded, setFolded] = useState(false);
  const units = useUnits();
  return (
    <div
      role="alert"
      aria-labelledby="inside-alarm-title"
      className={`fixed inset-x-0 top-0 z-[2000] flex flex-col items-center justify-center gap-4 bg-safety-red px-6 text-center text-white ${folded ? 'py-3' : 'bottom-0'}`}
    >
      <p id="inside-alarm-title" className={`${folded ? 'text-2xl' : 'text-5xl'} font-bold leading-tight`}>
        You are inside the exclusion zone
      </p>
      <p className={`${folded ? 'text-xl' : 'text-4xl'} font-bold`}>
        {sideText(reading.distance, units)} · {reading.excavation.reference}
      </p>
      {folded ? null : <p className="text-2xl">Stop. Move the load back out past the line before going on.</p>}
      <button
        type="button"
        onClick={() => setFolded((f) => !f)}
        className="min-h-14 rounded-md border-4 border-white bg-transparent px-6 text-xl font-bold text-white"
      >
        {folded ? 'Show the warning in full' : 'Fold to see the map'}
      </button>
    </div>
  );
}

function useVibrateOnEntry(inside: boolean) {
  const was = useRef(false);
  useEffect(() => {
    if (inside && !was.current && typeof navigator !== 'undefined' && typeof navigator.vibrate === 'function')
      navigator.vibrate([600, 200, 600, 200, 600]);
    was.current = inside;
  }, [inside]);
}

function LocationMessage({ location }: { location: LocationState }) {
  if (location.status === 'waiting') return <p role="status">Finding your position… Outdoors with a clear sky this takes a few seconds.</p>;
  if (location.status === 'denied')
    return (
      <p role="alert" className="font-semibold">
        The phone did not allow Brink to read its position. To allow it, open the browser’s settings for this site and allow location; then
        press “Show where I am” again. The map and the zone still show without it.
      </p>
    );
  if (location.status === 'unavailable') return <p role="alert">{location.message}</p>;
  return null;
}

/** "Where am I": an explanation first, then my position, the live reading and the inside alarm. */
export function WhereAmI({ permit, onFix }: { permit: FieldPermit; onFix: (fix: Fix | null) => void }) {
  const { active, location, start, stop } = usePositionOnRequest();
  const zones = useMemo(() => prepareZones(permit), [permit]);
  const fix = location.status === 'on' ? location.fix : null;
  const reading = fix ? readFix(zones, fix) : null;
  useEffect(() => onFix(fix), [fix, onFix]);
  useVibrateOnEntry(reading?.kind === 'inside');

  return (
    <section aria-labelledby="where-title" className="flex flex-col gap-3">
      <h2 id="where-title" className="text-2xl font-bold">
        Where you stand
      </h2>
      {!active ? (
        <>
          <p>
            Brink can use this phone’s location to show you on the map and say how far you are from the exclusion zone’s boundary. Your
            position stays on this phone: it is not sent or kept. The phone will ask you to allow it.
          </p>
          <Button className="min-h-14 w-full text-xl" onClick={start}>
            Show where I am
          </Button>
        </>
      ) : (
        <>
          <LocationMessage location={location} />
          {reading && reading.kind !== 'none' && location.status === 'on' ? <ReadingPanel reading={reading} at={location.at} /> : null}
          {reading?.kind === 'none' ? <p>This permit has no exclusion zone yet, so there is no line to measure against.</p> : null}
          <p className="sr-only" aria-live="assertive">
            {reading && reading.kind !== 'none'
              ? reading.kind === 'inside'
                ? 'Inside the exclusion zone'
                : reading.kind === 'outside'
                  ? 'Outside the exclusion zone'
                  : 'Cannot tell which side'
              : ''}
          </p>
          <Button variant="secondary" className="min-h-12 w-full" onClick={stop}>
            Stop showing my position
          </Button>
        </>
      )}
      {reading?.kind === 'inside' ? <InsideAlarm reading={reading} /> : null}
    </section>
  );
}
