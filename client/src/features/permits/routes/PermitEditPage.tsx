import { useEffect, useMemo, useRef, useState } from 'react';
import { useForm, type FieldErrors, type Path, type PathValue, type Resolver } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { Link, useNavigate, useParams } from 'react-router-dom';
import { useQueryClient } from '@tanstack/react-query';
import { localProjection, type LocalProjection, type XY } from '@shared/geometry';
import { pointSegment } from '@shared/geometry/planar';
import {
  checkExcavationOf,
  cumulativeCheck,
  planOutcome,
  type CheckExcavation,
  type CheckPlanInput,
  type PlantForCheck,
  type Refused,
} from '@shared/permits/check';
import {
  permitCreateSchema,
  placedLoadLabels,
  serviceCheckKeys,
  serviceCheckLabels,
  type DigDetails,
  type LngLat,
  type PermitCheck,
  type PermitCreate,
  type PermitDetail,
  type PermitKind,
  type PlacedLoad,
  type PlacedLoadKind,
} from '@shared/schemas/permits';
import { stockpileMaterials } from '@shared/schemas/plant';
import { surchargeMethodLabels, surchargeMethods, type SurchargeMethod } from '@shared/schemas/sites';
import { Button, ButtonLink } from '@client/components/Button';
import { CheckboxField, FormSummary, SelectField, TextField } from '@client/components/Fields';
import { Page, Panel } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { api, ApiError } from '@client/lib/api';
import { fieldsSummary } from '@client/lib/fieldLabels';
import { applyServerErrors, errorPaths, fieldSentence } from '@client/lib/forms';
import { parseId } from '@client/lib/session';
import {
  checkOnServer,
  checkRequestOnServer,
  permitKeys,
  useCreatePermit,
  useExcavations,
  useOperators,
  usePermit,
  usePlant,
  useSite,
  useUpdatePermit,
} from '../api/permits';
import { placeAtStandoff, PLACING_MARGIN } from '../components/autoPlace';
import { liveOutcome, type LiveOutcome } from '../components/liveCheck';
import { CheckSheets } from '../components/CheckSheet';
import { PlacementMap } from '../components/PlacementMap';
import { centreOf, moveLoad, rectangle, segment } from '../components/placement';
import { fromLocalInput, toLocalInput } from '../components/time';
import { useFigures, useUnits } from '@client/lib/units';
import { readQuantity } from '@client/lib/quantityInput';
import { QuantityBox } from '@client/components/QuantityField';
import { inSystem, unitLabel } from '@shared/units';

/** The form's values: a request as the shared create schema reads it (the same schema checks it before it is sent). */
interface Draft {
  siteId: number;
  kind: PermitKind;
  description: string;
  windowStart: string;
  windowEnd: string;
  excavationIds: number[];
  operatorIds: number[];
  /** Absent on a new request until chosen: the site's default. */
  method?: SurchargeMethod;
  loads: PlacedLoad[];
  dig: DigDetails | null;
}

/** A new request: the window from a quarter hour from now for eight hours, the excavation it was asked from. */
function newDraft(siteId: number, excavationId: number | null): Draft {
  const now = Date.now();
  return {
    siteId,
    kind: 'load',
    description: '',
    windowStart: new Date(Math.ceil((now + 15 * 60_000) / 300_000) * 300_000).toISOString(),
    windowEnd: new Date(Math.ceil((now + 15 * 60_000) / 300_000) * 300_000 + 8 * 3600_000).toISOString(),
    excavationIds: excavationId ? [excavationId] : [],
    operatorIds: [],
    loads: [],
    dig: null,
  };
}

function draftOf(p: PermitDetail): Draft {
  const r = p.current;
  return {
    siteId: p.siteId,
    kind: p.kind,
    description: r.description,
    windowStart: r.windowStart,
    windowEnd: r.windowEnd,
    excavationIds: r.excavationIds,
    operatorIds: r.operators.map((o) => o.id),
    method: r.method,
    loads: r.loads,
    dig: r.dig,
  };
}

const emptyDig: DigDetails = {
  depth: 1.2,
  supportMethod: '',
  servicesChecks: {
    drawings: { state: 'pending', by: '', at: null, notes: '' },
    locatorScan: { state: 'pending', by: '', at: null, notes: '' },
    trialHoles: { state: 'pending', by: '', at: null, notes: '' },
  },
};

/** Changing a draft or returned permit: placing loads with the live check, the window, the people, the dig checks. */
export function PermitEditPage() {
  const id = parseId(useParams().permitId) ?? 0;
  const permit = usePermit(id);
  if (permit.isPending) return <Loading what="Loading the permit" />;
  if (permit.isError) return <LoadError error={permit.error} retry={() => permit.refetch()} />;
  return <Editor permit={permit.data} key={`${permit.data.id}-${permit.data.revision}`} />;
}

/** What the editor works on: a saved draft or returned permit, or a request not yet saved (the page that asks for a permit). */
type EditorSubject = { permit: PermitDetail } | { permit: null; siteId: number; excavationId: number | null };

/** How many moves "Undo" can take back. */
const UNDO_DEPTH = 20;

/**
 * Asking for a permit and placing its loads, on one page: the request (the work, the window, the
 * excavations, the operators), the loads on the map with the live check, and the dig checks. A
 * machine chosen from the library lands at its computed standoff from the named excavation; the
 * last moves can be undone. A new request is created when it is first saved or sent.
 */
export function Editor(subject: EditorSubject) {
  const figures = useFigures();
  const { permit } = subject;
  const siteId = permit ? permit.siteId : subject.siteId;
  const navigate = useNavigate();
  const site = useSite(siteId);
  const excavations = useExcavations(siteId);
  const plantQ = usePlant();
  const operators = useOperators(siteId);
  const create = useCreatePermit();
  const update = useUpdatePermit(permit?.id ?? 0);
  const qc = useQueryClient();
  // The request is a react-hook-form form checked with the shared create schema before anything is
  // sent; the map, the load rows and Undo change its values with setValue.
  const form = useForm<Draft, unknown, PermitCreate>({
    // The values are always whole (every load complete, lists present), a narrower shape than the
    // schema's input, which its resolver is typed for.
    resolver: zodResolver(permitCreateSchema) as Resolver<Draft, unknown, PermitCreate>,
    defaultValues: permit ? draftOf(permit) : newDraft(siteId, subject.permit === null ? subject.excavationId : null),
    // The summary above the form takes the focus, not the first field.
    shouldFocusError: false,
  });
  const { register, setValue, getValues, setError, handleSubmit } = form;
  const draft = form.watch();
  const kind = draft.kind;
  /** The refusals of the form's check and of the server, named as the API names fields (`loads[0].height`). */
  const fields = errorPaths(form.formState.errors);
  const [version, setVersion] = useState(permit?.version ?? 0);
  // Each refusal shows the summary anew (and it takes the focus again), even with the same words.
  const [summary, setSummary] = useState<{ text: string; n: number } | null>(null);
  const say = (text: string | null) => setSummary((s) => (text === null ? null : { text, n: (s?.n ?? 0) + 1 }));
  const [server, setServer] = useState<PermitCheck | null>(permit?.current.check ?? null);
  const [newKind, setNewKind] = useState<Exclude<PlacedLoadKind, 'plant'>>('stockpile');
  const [placed, setPlaced] = useState<string | null>(null);
  const [history, setHistory] = useState<PlacedLoad[][]>([]);
  const [busy, setBusy] = useState(false);
  const operatorsOffered = useRef(permit !== null);
  const undoRef = useRef<() => void>(() => undefined);

  // Ctrl+Z (⌘Z) takes back the last move, except while typing in a box (the box's own undo).
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const typing =
        e.target instanceof HTMLInputElement || e.target instanceof HTMLTextAreaElement || e.target instanceof HTMLSelectElement;
      if ((e.ctrlKey || e.metaKey) && !e.shiftKey && e.key.toLowerCase() === 'z' && !typing) {
        e.preventDefault();
        undoRef.current();
      }
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, []);

  const proj = useMemo(() => (site.data ? localProjection([site.data.longitude, site.data.latitude]) : null), [site.data]);
  const plant = useMemo(() => new Map<number, PlantForCheck>((plantQ.data ?? []).map((p) => [p.id, p])), [plantQ.data]);
  const named = useMemo(
    () => (excavations.data ?? []).filter((e) => draft.excavationIds.includes(e.id)),
    [excavations.data, draft.excavationIds],
  );
  const nearby = useMemo(
    () => (excavations.data ?? []).filter((e) => e.state === 'open' && !draft.excavationIds.includes(e.id)),
    [excavations.data, draft.excavationIds],
  );
  const namedForCheck = useMemo(() => named.map(checkExcavationOf), [named]);
  const nearbyForCheck = useMemo(() => nearby.map(checkExcavationOf), [nearby]);
  const method = draft.method ?? site.data?.defaultMethod ?? 'dispersion-45';

  // A new request names the operators of the supervisor's last request on the site, ticked.
  useEffect(() => {
    if (operatorsOffered.current || !operators.data) return;
    operatorsOffered.current = true;
    setValue('operatorIds', operators.data.lastUsed);
  }, [operators.data, setValue]);

  // The other permits to count come from the server (authoritative), again when the window or excavations change.
  useEffect(() => {
    const t = setTimeout(() => {
      const proposal = { windowStart: draft.windowStart, windowEnd: draft.windowEnd, excavationIds: draft.excavationIds, loads: [] };
      (permit ? checkOnServer(permit.id, proposal) : checkRequestOnServer(siteId, proposal)).then(setServer).catch(() => undefined);
    }, 300);
    return () => clearTimeout(t);
  }, [permit, siteId, draft.windowStart, draft.windowEnd, draft.excavationIds]);

  // While a handle is dragged: the positions it reports are applied at most once an animation frame
  // (the latest wins), and each frame checks only the verdict where the loads stand (no standoff
  // search). Let go: the last position is applied first, then the full check runs on it, so what
  // stays on screen is always the full check of where the loads are.
  const [dragging, setDragging] = useState(false);
  const pendingMoves = useRef(new Map<string, () => void>());
  const frame = useRef<number | null>(null);
  const applyMoves = () => {
    if (frame.current !== null) cancelAnimationFrame(frame.current);
    frame.current = null;
    const moves = [...pendingMoves.current.values()];
    pendingMoves.current.clear();
    for (const apply of moves) apply();
  };
  const moveOnNextFrame = (key: string, apply: () => void) => {
    pendingMoves.current.set(key, apply);
    if (frame.current === null) frame.current = requestAnimationFrame(applyMoves);
  };
  useEffect(
    () => () => {
      if (frame.current !== null) cancelAnimationFrame(frame.current);
    },
    [],
  );

  /** Everything the check reads but the loads (new when any of it changes; nothing in it is changed in place). */
  const checkBasis = useMemo(
    (): CheckPlanInput | null =>
      site.data
        ? {
            origin: [site.data.longitude, site.data.latitude],
            method,
            minimumClearance: site.data.minimumClearance,
            permit: { id: permit?.id ?? null, number: permit?.number ?? 'new', windowStart: draft.windowStart, windowEnd: draft.windowEnd },
            excavations: namedForCheck,
            nearby: nearbyForCheck,
            plant,
            others: server?.otherPermits ?? [],
          }
        : null,
    [site.data, method, permit?.id, permit?.number, draft.windowStart, draft.windowEnd, namedForCheck, nearbyForCheck, plant, server],
  );
  /**
   * The check of a drag's frames (the verdict only): everything but the loads read once, and each
   * load worked out again only when it changes (planOutcome), so a frame measures the moved load alone.
   */
  const framePlan = useMemo(() => (checkBasis ? planOutcome({ ...checkBasis, standoffs: false }) : null), [checkBasis]);
  // Before the first drag, when the browser is idle: a few frames' checks of the first load moved,
  // their results dropped, so that a drag's first frames run code the browser has
  // already compiled (measured against no warm-up in docs/performance.md).
  // Stops when a drag starts; once a page.
  const warmed = useRef(false);
  useEffect(() => {
    if (warmed.current || dragging || !framePlan || !proj || draft.loads.length === 0) return;
    const loads = draft.loads;
    const from = centreOf(loads[0], proj);
    const across = nearestPoint(from, namedForCheck, proj);
    let done = 0;
    let stopped = false;
    const idle = typeof requestIdleCallback === 'function';
    let handle = 0;
    const next = (run: (deadline?: IdleDeadline) => void) => {
      handle = idle ? requestIdleCallback(run) : window.setTimeout(run, 20);
    };
    const frame = () => {
      done++;
      const moved = moveLoad(loads[0], warmUpPosition(done, from, across), proj);
      try {
        framePlan([moved, ...loads.slice(1)], new Date());
      } catch {
        // A warm-up's result, or its refusal, is dropped.
      }
    };
    const warm = (deadline?: IdleDeadline) => {
      do frame();
      while (done < WARM_UP_FRAMES && deadline && deadline.timeRemaining() > 4);
      if (done < WARM_UP_FRAMES) return next(warm);
      // The code the browser compiled meanwhile (on other threads) is put in place when the check
      // next runs: a few more frames a moment later, so that it is not the drag's first frame.
      window.setTimeout(() => stopped || next(settle), WARM_UP_SETTLE_MS);
    };
    const settle = () => {
      for (let i = 0; i < WARM_UP_SETTLE_FRAMES; i++) frame();
      warmed.current = true;
      try {
        framePlan(loads, new Date()); // the plan keeps the loads as they stand, for the first frame
      } catch {
        // Shown by the full check already.
      }
      performance.mark?.(DRAG_READY_MARK);
    };
    next(warm);
    return () => {
      stopped = true;
      if (idle) cancelIdleCallback(handle);
      else clearTimeout(handle);
    };
  }, [framePlan, namedForCheck, proj, draft.loads, dragging]);

  /** The full live check of these loads (with the standoff search). */
  function runLive(loads: PlacedLoad[]): PermitCheck {
    const { permit: basisPermit, ...basis } = checkBasis!;
    return cumulativeCheck({ ...basis, permit: { ...basisPermit, loads }, now: new Date() });
  }

  // The live check, in the browser with the shared engine and the shared schemas, on every move.
  // Figures the schemas refuse give "Cannot check", never a verdict.
  const live = useMemo((): LiveOutcome & { partial: boolean } => {
    const started = performance.now();
    try {
      return { ...liveCheck(dragging), partial: dragging };
    } finally {
      measureLiveCheck(started, dragging);
    }
    // eslint-disable-next-line react-hooks/exhaustive-deps -- liveCheck reads exactly these
  }, [
    site.data,
    proj,
    draft.loads,
    draft.windowStart,
    draft.windowEnd,
    named,
    nearby,
    plant,
    plantQ.data,
    permit?.id,
    permit?.number,
    server,
    method,
    dragging,
    checkBasis,
    framePlan,
  ]);

  function liveCheck(verdictOnly: boolean): LiveOutcome {
    if (!site.data || !proj || draft.loads.length === 0 || named.length === 0 || !plantQ.data)
      return { check: null, refused: null, invalid: null };
    // A drag frame (`verdictOnly`) runs the plan: the verdict only, no standoff search.
    return liveOutcome((): PermitCheck | Refused => (verdictOnly && framePlan ? framePlan(draft.loads, new Date()) : runLive(draft.loads)));
  }

  if (site.isPending || excavations.isPending || plantQ.isPending) return <Loading what="Loading the site" />;
  if (site.isError || excavations.isError || plantQ.isError) return <LoadError error={site.error ?? excavations.error ?? plantQ.error} />;
  if (!proj) return null;

  const set = <K extends Path<Draft>>(name: K, value: PathValue<Draft, K>) => setValue(name, value, { shouldDirty: true });
  /** Keeps the loads as they are now, for "Undo". */
  const remember = () => {
    const now = getValues('loads');
    setHistory((h) => [...h.slice(-(UNDO_DEPTH - 1)), now]);
  };
  const setLoads = (loads: PlacedLoad[]) => {
    remember();
    set('loads', loads);
  };
  const setLoad = (loadId: string, f: (l: PlacedLoad) => PlacedLoad) =>
    set(
      'loads',
      getValues('loads').map((l) => (l.id === loadId ? f(l) : l)),
    );
  const undo = () => {
    const last = history[history.length - 1];
    if (!last) return;
    setHistory((h) => h.slice(0, -1));
    set('loads', last);
    setPlaced(null);
  };
  undoRef.current = undo;
  const nextId = (prefix: string) => {
    let i = 1;
    while (draft.loads.some((l) => l.id === `${prefix}${i}`)) i++;
    return `${prefix}${i}`;
  };
  const startAt: XY = named[0]?.outline
    ? centreOf({ id: 'x', kind: 'area', label: '', pressure: 1, outline: named[0].outline as never }, proj)
    : [0, 0];

  /** Puts a machine from the library beside the first named excavation, at its computed standoff. */
  function addPlant(plantId: string) {
    const item = plant.get(Number(plantId));
    if (!item) return;
    const load: Extract<PlacedLoad, { kind: 'plant' }> = {
      id: nextId('plant'),
      kind: 'plant',
      label: item.name,
      plantItemId: item.id,
      position: proj!.toWgs84([startAt[0], startAt[1] + 10]) as [number, number],
      rotation: 90,
    };
    const beside = named.find((e) => e.state !== 'backfilled');
    if (!beside) {
      setLoads([...draft.loads, load]);
      setPlaced(`${item.name} is placed north of the site origin: name the excavation it works beside, then drag it into place.`);
      return;
    }
    const tryCheck = (l: PlacedLoad) => {
      try {
        return runLive([...draft.loads, l]);
      } catch {
        return null;
      }
    };
    const { load: at, standoff } = placeAtStandoff(load, beside, proj!, draft.loads.filter((l) => l.kind === 'plant').length, tryCheck);
    setLoads([...draft.loads, at]);
    setPlaced(
      standoff === null
        ? `${item.name} has no standoff within 3H of ${beside.reference}: it is placed beyond the influence zone. Drag it to where it will work and read the check.`
        : `${item.name} is placed ${figures.length(standoff + PLACING_MARGIN)} from the edge of ${beside.reference}, just beyond its computed standoff of ${figures.length(standoff, { rounding: 'up' })}. Drag it nearer or farther and watch the verdict.`,
    );
  }
  function addAdHoc() {
    const at: XY = [startAt[0], startAt[1] + 10];
    const id = nextId(newKind);
    const outline = { type: 'Polygon' as const, coordinates: [rectangle(at, 4, 3, 90, proj!)] };
    const load: PlacedLoad =
      newKind === 'stockpile'
        ? { id, kind: 'stockpile', label: 'Stockpile', outline, unitWeight: 19, height: 1.5 }
        : newKind === 'area'
          ? { id, kind: 'area', label: 'Area load', outline, pressure: 20 }
          : newKind === 'strip'
            ? {
                id,
                kind: 'strip',
                label: 'Strip load',
                outline: { type: 'Polygon', coordinates: [rectangle(at, 20, 2, 90, proj!)] },
                pressure: 20,
              }
            : { id, kind: 'line', label: 'Line load', path: { type: 'LineString', coordinates: segment(at, 10, 90, proj!) }, force: 10 };
    setLoads([...draft.loads, load]);
  }

  /** The fields this page shows next to their boxes; the summary names only the others. */
  const shownHere = (path: string) =>
    ['description', 'windowStart', 'windowEnd', 'excavationIds', 'loads'].includes(path) ||
    /^loads\[\d+\]/.test(path) ||
    (kind === 'dig' && path.startsWith('dig'));
  const shownFields: Path<Draft>[] = [
    'description',
    'windowStart',
    'windowEnd',
    'excavationIds',
    'loads',
    ...(kind === 'dig' ? (['dig'] as const) : []),
  ];
  /** The form's own check refused it: each reason stands by its field, the summary names the others. */
  const invalid = (errors: FieldErrors<Draft>) => say(fieldsSummary(errorPaths(errors), shownHere));
  function refused(e: unknown) {
    if (e instanceof ApiError && e.status === 409) say(`${e.message} Reload the page to see it as it now is.`);
    else say(applyServerErrors(e, setError, shownFields));
  }

  /** Saves the request (creating it the first time); answers with the permit's id and version, or null when refused. */
  async function save(values: PermitCreate): Promise<{ id: number; version: number } | null> {
    say(null);
    try {
      if (!permit) {
        const created = await create.mutateAsync(values);
        return { id: created.id, version: created.version };
      }
      const { siteId: _site, kind: _kind, ...change } = values;
      const saved = await update.mutateAsync({ version, ...change });
      setVersion(saved.version);
      setServer(saved.current.check);
      return { id: saved.id, version: saved.version };
    } catch (e) {
      refused(e);
      return null;
    }
  }
  const saveOnly = handleSubmit(async (values) => {
    setBusy(true);
    const saved = await save(values);
    setBusy(false);
    if (saved && !permit) void navigate(`/permits/${saved.id}/edit`, { replace: true });
  }, invalid);
  const saveAndSubmit = handleSubmit(async (values) => {
    setBusy(true);
    try {
      const saved = await save(values);
      if (!saved) return;
      try {
        await api.post(`/api/permits/${saved.id}/transitions`, { action: 'submit', version: saved.version });
        await qc.invalidateQueries({ queryKey: permitKeys.all });
        void navigate(`/permits/${saved.id}`);
      } catch (e) {
        if (!permit) void navigate(`/permits/${saved.id}/edit`, { replace: true });
        refused(e);
      }
    } finally {
      setBusy(false);
    }
  }, invalid);

  const check = live.check ?? null;
  const verdict = live.refused ? 'fails' : (check?.verdict ?? null);
  // Mid-drag the check has no standoffs yet: no exclusion zone is drawn until the load is let go.
  const standoff = live.partial ? null : (check?.computedStandoff ?? null);
  const title = permit ? `Permit ${permit.number}: ${permit.kind === 'load' ? 'place the loads' : 'dig details'}` : 'Ask for a permit';
  const beside = named.map((e) => e.reference).join(', ');

  return (
    <Page
      title={title}
      intro={
        permit
          ? 'Place each load on the map; the check runs as you move it. Save keeps your changes; the server checks them again.'
          : `Say what the work is${beside ? ` beside ${beside}` : ' and tick the excavation beside it'}, choose the machine and drag it where it will work; the check runs as you move it. Sending it asks a coordinator to decide.`
      }
      actions={permit ? <ButtonLink to={`/permits/${permit.id}`}>Back to the permit</ButtonLink> : null}
    >
      <FormSummary message={summary?.text} key={summary?.n} />
      <Panel title="Request" level={2}>
        {!permit ? (
          <SelectField
            label="Kind of permit"
            {...register('kind')}
            options={[
              { value: 'load', label: 'Place plant or material beside an excavation' },
              { value: 'dig', label: 'Dig: open or extend an excavation' },
            ]}
          />
        ) : null}
        <TextField label="What the work is" error={fields.description} maxLength={1000} {...register('description')} />
        <div className="grid gap-3 sm:grid-cols-2">
          <TextField
            label="Window opens"
            type="datetime-local"
            value={toLocalInput(draft.windowStart)}
            onChange={(e) => e.target.value && set('windowStart', fromLocalInput(e.target.value))}
            error={fields.windowStart}
          />
          <TextField
            label="Window closes"
            type="datetime-local"
            value={toLocalInput(draft.windowEnd)}
            onChange={(e) => e.target.value && set('windowEnd', fromLocalInput(e.target.value))}
            error={fields.windowEnd}
          />
        </div>
        <fieldset className="flex flex-col gap-1">
          <legend className="font-semibold">Excavations beside the work</legend>
          {(excavations.data ?? [])
            .filter((e) => e.state !== 'backfilled')
            .map((e) => (
              <CheckboxField
                key={e.id}
                label={`${e.reference} ${e.name} (${figures.length(e.depth)} deep)`}
                checked={draft.excavationIds.includes(e.id)}
                onChange={(ev) =>
                  set('excavationIds', ev.target.checked ? [...draft.excavationIds, e.id] : draft.excavationIds.filter((x) => x !== e.id))
                }
              />
            ))}
          {fields.excavationIds ? (
            <p className="text-sm font-semibold text-error-text">{fieldSentence('Excavations beside the work', fields.excavationIds)}</p>
          ) : null}
        </fieldset>
      </Panel>
      <div className="grid gap-6 lg:grid-cols-[3fr_2fr]">
        <div className="flex flex-col gap-4">
          <div className="flex flex-wrap items-end gap-3">
            <SelectField
              label="Add a machine from the plant library"
              value=""
              onChange={(e) => addPlant(e.target.value)}
              emptyLabel="Choose a machine"
              options={(plantQ.data ?? []).map((p) => ({
                value: p.id,
                label: `${p.name} (${figures.system === 'us' ? figures.mass(p.operatingMass) : `${p.operatingMass} t`})`,
              }))}
              hint={
                named.length
                  ? `It is placed at its standoff from ${named[0].reference}.`
                  : 'Tick the excavation first: the machine is placed at its standoff from it.'
              }
            />
            <Button variant="secondary" onClick={undo} disabled={history.length === 0} aria-keyshortcuts="Control+Z">
              Undo the last move{history.length ? ` (${history.length})` : ''}
            </Button>
          </div>
          {placed ? (
            <p role="status" className="text-sm">
              {placed}
            </p>
          ) : null}
          <PlacementMap
            proj={proj}
            excavations={named.length ? named : (excavations.data ?? [])}
            loads={draft.loads}
            plant={plant}
            check={check}
            verdict={verdict}
            standoff={standoff}
            editable
            onMoveStart={remember}
            onMove={(loadId, to) => moveOnNextFrame(`move:${loadId}`, () => setLoad(loadId, (l) => moveLoad(l, to, proj)))}
            onRotate={(loadId, bearing) =>
              moveOnNextFrame(`turn:${loadId}`, () => setLoad(loadId, (l) => (l.kind === 'plant' ? { ...l, rotation: bearing } : l)))
            }
            onDragging={(on) => {
              if (!on) applyMoves();
              setDragging(on);
            }}
          />
          <Panel title="Loads" level={2}>
            {draft.loads.length === 0 ? <p>No loads yet. Add a machine from the library above or an ad hoc load.</p> : null}
            {draft.loads.map((l, i) => (
              <LoadRow
                key={l.id}
                load={l}
                index={i}
                proj={proj}
                plantName={l.kind === 'plant' ? plant.get(l.plantItemId)?.name : undefined}
                fields={fields}
                onChange={(nl) => {
                  remember();
                  setLoad(l.id, () => nl);
                }}
                onRemove={() => setLoads(draft.loads.filter((x) => x.id !== l.id))}
              />
            ))}
            <div className="flex flex-wrap items-end gap-3">
              <SelectField
                label="Ad hoc load"
                value={newKind}
                onChange={(e) => setNewKind(e.target.value as typeof newKind)}
                options={(['stockpile', 'area', 'strip', 'line'] as const).map((k) => ({ value: k, label: placedLoadLabels[k] }))}
              />
              <Button variant="secondary" onClick={addAdHoc}>
                Add load
              </Button>
            </div>
          </Panel>
        </div>
        <div className="flex flex-col gap-4">
          <Panel title="Live check" level={2}>
            {live.invalid ? (
              <p role="status" className="font-semibold text-ink-soft" data-verdict="none" data-testid="cannot-check">
                {live.invalid}
              </p>
            ) : live.refused ? (
              <p role="alert" className="font-semibold" style={{ color: '#8b1d1d' }} data-verdict="fails">
                {live.refused}
              </p>
            ) : check ? (
              <CheckSheets check={check} full={false} standoffsPending={live.partial} />
            ) : (
              <p>Name an excavation and place a load to see the check.</p>
            )}
          </Panel>
        </div>
      </div>
      <Panel title="People and method" level={2}>
        <fieldset className="flex flex-col gap-1">
          <legend className="font-semibold">Operators to brief (each confirms before work starts)</legend>
          {(operators.data?.operators ?? []).map((o) => (
            <CheckboxField
              key={o.id}
              label={o.name}
              checked={draft.operatorIds.includes(o.id)}
              onChange={(ev) =>
                set('operatorIds', ev.target.checked ? [...draft.operatorIds, o.id] : draft.operatorIds.filter((x) => x !== o.id))
              }
            />
          ))}
          {operators.data && operators.data.lastUsed.length && !permit ? (
            <p className="text-sm text-ink-soft">Ticked: the operators of your last request on this site.</p>
          ) : null}
        </fieldset>
        <SelectField
          label="Method"
          value={method}
          onChange={(e) => set('method', e.target.value as SurchargeMethod)}
          options={surchargeMethods.map((m) => ({ value: m, label: surchargeMethodLabels[m] }))}
        />
      </Panel>
      {kind === 'dig' ? <DigForm dig={draft.dig ?? emptyDig} fields={fields} onChange={(dig) => set('dig', dig)} /> : null}
      <div className="flex flex-wrap gap-3">
        <Button
          onClick={() => void saveOnly()}
          busy={busy && (create.isPending || update.isPending)}
          disabled={busy}
          busyText="Saving…"
          variant="secondary"
        >
          {permit ? 'Save' : 'Save as a draft'}
        </Button>
        <Button onClick={() => void saveAndSubmit()} busy={busy} busyText="Sending…">
          Send for review
        </Button>
        <Link to={permit ? `/permits/${permit.id}` : `/sites/${siteId}/permits`} className="self-center">
          Leave without saving
        </Link>
      </div>
    </Page>
  );
}

function num(v: string): number {
  return v === '' ? NaN : Number(v);
}

function LoadRow({
  load,
  index,
  proj,
  plantName,
  fields,
  onChange,
  onRemove,
}: {
  load: PlacedLoad;
  index: number;
  proj: ReturnType<typeof localProjection>;
  plantName?: string;
  fields: Record<string, string>;
  onChange: (l: PlacedLoad) => void;
  onRemove: () => void;
}) {
  const c = centreOf(load, proj);
  const figures = useFigures();
  const err = (k: string) => fields[`loads[${index}].${k}`] ?? (k === '' ? fields[`loads[${index}]`] : undefined);
  return (
    <fieldset className="flex flex-col gap-2 rounded-md border border-rule p-3" aria-label={`Load ${load.label || load.id}`}>
      <legend className="font-semibold">
        {load.label || load.id}
        {plantName ? ` – ${plantName}` : ''}
      </legend>
      {fields[`loads[${index}]`] ? <p className="text-sm font-semibold text-error-text">{fields[`loads[${index}]`]}</p> : null}
      <div className="grid gap-2 sm:grid-cols-3">
        <TextField label="Name" value={load.label} onChange={(e) => onChange({ ...load, label: e.target.value })} />
        <OffsetField label="East of the site origin" value={c[0]} onCommit={(x) => onChange(moveLoad(load, [x, c[1]], proj))} />
        <OffsetField label="North of the site origin" value={c[1]} onCommit={(y) => onChange(moveLoad(load, [c[0], y], proj))} />
        {load.kind === 'plant' ? (
          <TextField
            label="Facing (degrees from north)"
            type="number"
            step="1"
            min="0"
            max="360"
            value={load.rotation}
            onChange={(e) => Number.isFinite(num(e.target.value)) && onChange({ ...load, rotation: num(e.target.value) })}
            error={err('rotation')}
          />
        ) : null}
        {load.kind === 'stockpile' ? (
          <>
            <SelectField
              label="Material"
              value=""
              emptyLabel="Typical unit weights…"
              onChange={(e) => e.target.value && onChange({ ...load, unitWeight: Number(e.target.value) })}
              options={stockpileMaterials.map((m) => ({ value: m.unitWeight, label: `${m.name}: ${figures.unitWeight(m.unitWeight)}` }))}
            />
            <QuantityBox
              label="Unit weight"
              quantity="unitWeight"
              value={load.unitWeight}
              onChange={(v) => onChange({ ...load, unitWeight: v ?? NaN })}
              error={err('unitWeight')}
            />
            <QuantityBox
              label="Height"
              quantity="length"
              value={load.height}
              onChange={(v) => onChange({ ...load, height: v ?? NaN })}
              error={err('height')}
              hint={
                Number.isFinite(load.unitWeight * load.height)
                  ? `Presses ${figures.pressure(load.unitWeight * load.height)}`
                  : 'Give the unit weight and the height'
              }
            />
          </>
        ) : null}
        {load.kind === 'area' || load.kind === 'strip' ? (
          <QuantityBox
            label="Pressure"
            quantity="pressure"
            value={load.pressure}
            onChange={(v) => onChange({ ...load, pressure: v ?? NaN })}
            error={err('pressure')}
          />
        ) : null}
        {load.kind === 'line' ? (
          <QuantityBox
            label="Force"
            quantity="lineForce"
            value={load.force}
            onChange={(v) => onChange({ ...load, force: v ?? NaN })}
            error={err('force')}
          />
        ) : null}
      </div>
      <div>
        <Button variant="quiet" onClick={onRemove}>
          Remove this load
        </Button>
      </div>
    </fieldset>
  );
}

function DigForm({ dig, fields, onChange }: { dig: DigDetails; fields: Record<string, string>; onChange: (d: DigDetails) => void }) {
  return (
    <Panel title="Dig: depth, support and buried services" level={2}>
      <div className="grid gap-3 sm:grid-cols-2">
        <QuantityBox
          label="Depth"
          quantity="length"
          value={dig.depth}
          onChange={(v) => onChange({ ...dig, depth: v ?? NaN })}
          error={fields['dig.depth']}
        />
        <TextField
          label="Support method"
          value={dig.supportMethod}
          onChange={(e) => onChange({ ...dig, supportMethod: e.target.value })}
          error={fields['dig.supportMethod'] ?? fields.dig}
        />
      </div>
      {serviceCheckKeys.map((k) => {
        const c = dig.servicesChecks[k];
        const setC = (patch: Partial<typeof c>) => onChange({ ...dig, servicesChecks: { ...dig.servicesChecks, [k]: { ...c, ...patch } } });
        const f = (x: string) => fields[`dig.servicesChecks.${k}.${x}`];
        return (
          <fieldset key={k} className="grid gap-2 rounded-md border border-rule p-3 sm:grid-cols-4">
            <legend className="font-semibold">{serviceCheckLabels[k]}</legend>
            <SelectField
              label="State"
              value={c.state}
              onChange={(e) => setC({ state: e.target.value as typeof c.state })}
              options={[
                { value: 'pending', label: 'Not done yet' },
                { value: 'done', label: 'Done' },
                ...(k === 'trialHoles' ? [{ value: 'not-needed', label: 'Not needed' }] : []),
              ]}
              error={fields[`dig.servicesChecks.${k}`] ?? f('state')}
            />
            <TextField label="Who did it" value={c.by} onChange={(e) => setC({ by: e.target.value })} error={f('by')} />
            <TextField
              label="When"
              type="datetime-local"
              value={c.at ? toLocalInput(c.at) : ''}
              onChange={(e) => setC({ at: e.target.value ? fromLocalInput(e.target.value) : null })}
              error={f('at')}
            />
            <TextField label="Notes" value={c.notes} onChange={(e) => setC({ notes: e.target.value })} error={f('notes')} />
          </fieldset>
        );
      })}
    </Panel>
  );
}

/**
 * A position in metres typed freely (a minus sign, a half-typed number) and applied when the field
 * is left or Enter is pressed; while it is not being typed in it follows the load as it is dragged.
 */
/** A load's offset from the site origin, in the person's units, moved when the figure is committed. */
function OffsetField({ label, value, onCommit }: { label: string; value: number; onCommit: (x: number) => void }) {
  const [text, setText] = useState<string | null>(null);
  const system = useUnits();
  const commit = () => {
    if (text === null) return;
    const x = readQuantity(text.replace(',', '.'), 'length', system).value;
    if (x !== null && Number.isFinite(x)) onCommit(x);
    setText(null);
  };
  return (
    <TextField
      label={`${label} (${unitLabel('length', system)})`}
      inputMode="decimal"
      value={text ?? inSystem('length', value, system).toFixed(2)}
      onChange={(e) => setText(e.target.value)}
      onBlur={commit}
      onKeyDown={(e) => {
        if (e.key === 'Enter') {
          e.preventDefault();
          commit();
        }
      }}
      hint="Type the figure, then Enter or leave the field"
    />
  );
}

/**
 * The User Timing names of the live check (read by `npm run bench -- web`): one frame of a drag
 * (the verdict only), and the full check (with standoffs) after a load is let go or changed.
 */
const LIVE_CHECK_MEASURE = 'brink:live-check';
/** Marked once the page has run a drag frame's check WARM_UP_FRAMES times at idle (read by the bench). */
const DRAG_READY_MARK = 'brink:drag-ready';
const WARM_UP_FRAMES = 120;
/** The warm-up's last frames, run this long (ms) after the others. */
const WARM_UP_SETTLE_MS = 100;
const WARM_UP_SETTLE_FRAMES = 6;
/** How far (m) the warm-up's frames around the load move it, in turn. */
const WARM_UP_REACH = [0.05, 0.5, 1, 2, 3];
/** Frames of the warm-up's walk from the load across an excavation and back, each way. */
const WARM_UP_WALK = 20;

/** The point of the excavations' drawn lines (a trench's centre line, a pit's outline) nearest `from`, site-local metres; null without one. */
function nearestPoint(from: XY, excavations: CheckExcavation[], proj: LocalProjection): XY | null {
  let best: XY | null = null;
  let bestD = Infinity;
  for (const { shape } of excavations) {
    const line = (shape.kind === 'trench' ? shape.centreLine.coordinates : shape.outline.coordinates[0]).map((p) =>
      proj.toLocal(p as LngLat),
    );
    for (let i = 0; i < line.length; i++) {
      const [d, x, y] = pointSegment(from, line[i], line[Math.min(i + 1, line.length - 1)]);
      if (d < bestD) [best, bestD] = [[x, y], d];
    }
  }
  return best;
}

/**
 * Where the warm-up's frame `i` puts the load that stands at `from`: every other frame around
 * where it stands, 5 cm to 3 m away (nearer and farther than an excavation's influence zone), and
 * the others on a walk from where it stands across the nearest point of an excavation's line
 * (`across`) to as far beyond and back, so that the frames of a drag across an excavation
 * (passing, failing, touching it: refused) have all run once the drag starts.
 */
function warmUpPosition(i: number, from: XY, across: XY | null): XY {
  if (across && i % 2 === 1) {
    const step = ((i - 1) / 2) % (2 * WARM_UP_WALK);
    const t = step <= WARM_UP_WALK ? (2 * step) / WARM_UP_WALK : (2 * (2 * WARM_UP_WALK - step)) / WARM_UP_WALK;
    return [from[0] + t * (across[0] - from[0]), from[1] + t * (across[1] - from[1])];
  }
  const r = WARM_UP_REACH[i % WARM_UP_REACH.length];
  const angle = (i * 2 * Math.PI) / 7;
  return [from[0] + r * Math.cos(angle), from[1] + r * Math.sin(angle)];
}
const FULL_CHECK_MEASURE = 'brink:full-check';
let liveMeasures = 0;
/** Records one live check's time as a performance measure; the oldest go after 500, so dragging all day keeps nothing growing. */
function measureLiveCheck(started: number, frame: boolean): void {
  if (typeof performance.measure !== 'function') return;
  if (++liveMeasures > 500) {
    performance.clearMeasures(LIVE_CHECK_MEASURE);
    performance.clearMeasures(FULL_CHECK_MEASURE);
    liveMeasures = 1;
  }
  performance.measure(frame ? LIVE_CHECK_MEASURE : FULL_CHECK_MEASURE, { start: started, end: performance.now() });
}
