import { createStore, del, get, set, values, type UseStore } from 'idb-keyval';
import type { concernReportedAnswer } from '@shared/schemas/field';
import type { BriefingAnswer } from '@shared/schemas/permits';
import { ApiError, apiFetch, sendForm } from '@client/lib/api';

/**
 * The outbox: briefing confirmations and concerns made on the phone, kept in IndexedDB (database
 * `brink-outbox`) until the server has taken them. Each carries an idempotency key made when the
 * operator acted; every attempt sends the same key, and the server treats a repeated key as the same
 * request, so an answer lost on the way back never makes a second record.
 *
 * An item leaves the outbox only when the server has answered 2xx. No signal, a slow or failing
 * server (5xx, 408, 429) or a lapsed sign-in (401) leave it waiting for the next attempt; any other
 * refusal (400, 403, 404, 409, 413) marks it "refused" with the server's reason, kept until the
 * operator discards it, so nothing typed is ever dropped without them seeing why.
 */

export interface OutboxPhoto {
  name: string;
  type: string;
  /** Bytes, not a Blob: every browser keeps ArrayBuffers in IndexedDB. */
  data: ArrayBuffer;
}

interface ItemBase {
  /** The idempotency key, also the item's key in the store. */
  key: string;
  /** Who made it: sent only while the same person is signed in. */
  userId: number;
  permitId: number;
  permitNumber: string;
  /** When the operator acted (the phone's clock). */
  createdAt: string;
  attempts: number;
  lastTriedAt: string | null;
  state: 'waiting' | 'refused';
  /** Why the last attempt did not go through, in words. */
  problem: string | null;
  /** The fields the server named, for a refusal. */
  fields: Record<string, string>;
}

export interface BriefingItem extends ItemBase {
  kind: 'briefing';
  /** The revision the operator read and was briefed on: a later revision needs a new briefing. */
  revision: number;
}

export interface ConcernItem extends ItemBase {
  kind: 'concern';
  excavationId: number;
  excavationReference: string;
  note: string;
  photos: OutboxPhoto[];
}

export type OutboxItem = BriefingItem | ConcernItem;
type NewOutboxItem = Omit<BriefingItem, keyof ItemBase> | Omit<ConcernItem, keyof ItemBase>;

let box: UseStore | null = null;
function store(): UseStore {
  box ??= createStore('brink-outbox', 'items');
  return box;
}

// Changes are announced in this page and to the app's other tabs.
const local = new EventTarget();
const channel = typeof BroadcastChannel === 'undefined' ? null : new BroadcastChannel('brink-outbox');
channel?.addEventListener('message', () => local.dispatchEvent(new Event('change')));
function announce(): void {
  local.dispatchEvent(new Event('change'));
  channel?.postMessage('change');
}

export function onOutboxChange(listener: () => void): () => void {
  local.addEventListener('change', listener);
  return () => local.removeEventListener('change', listener);
}

/** Answers of the server to sent items, for the app to refresh what it shows. */
const sentTarget = new EventTarget();
export function onOutboxSent(listener: (item: OutboxItem) => void): () => void {
  const handler = (e: Event) => listener((e as CustomEvent<OutboxItem>).detail);
  sentTarget.addEventListener('sent', handler);
  return () => sentTarget.removeEventListener('sent', handler);
}

/** Puts an action in the outbox with its idempotency key and the time it was made. */
export async function addToOutbox(
  key: string,
  userId: number,
  permit: { id: number; number: string },
  item: NewOutboxItem,
  now = new Date(),
): Promise<OutboxItem> {
  const full = {
    ...item,
    key,
    userId,
    permitId: permit.id,
    permitNumber: permit.number,
    createdAt: now.toISOString(),
    attempts: 0,
    lastTriedAt: null,
    state: 'waiting',
    problem: null,
    fields: {},
  } as OutboxItem;
  await set(key, full, store());
  announce();
  return full;
}

/** Every item of one person, oldest first. */
export async function outboxItems(userId: number): Promise<OutboxItem[]> {
  const all = await values<OutboxItem>(store());
  return all.filter((i) => i.userId === userId).sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.key.localeCompare(b.key));
}

/** Drops a refused item, at the operator's word. */
export async function discardItem(key: string): Promise<void> {
  await del(key, store());
  announce();
}

async function patchItem(key: string, change: Partial<OutboxItem>): Promise<void> {
  const item = await get<OutboxItem>(key, store());
  if (!item) return;
  await set(key, { ...item, ...change }, store());
}

type Outcome = { kind: 'sent' } | { kind: 'stop'; problem: string } | { kind: 'refused'; problem: string; fields: Record<string, string> };

const noSignal = 'No signal: it will be sent when the phone has a connection.';

/** One attempt at sending one item, with its idempotency key. */
async function attempt(item: OutboxItem): Promise<Outcome> {
  const headers = { 'Idempotency-Key': item.key };
  try {
    if (item.kind === 'briefing') {
      await apiFetch<BriefingAnswer>(`/api/permits/${item.permitId}/briefing`, {
        method: 'POST',
        headers,
        body: { idempotencyKey: item.key, revision: item.revision },
      });
    } else {
      const form = new FormData();
      form.set('excavationId', String(item.excavationId));
      form.set('note', item.note);
      form.set('idempotencyKey', item.key);
      for (const p of item.photos) form.append('photo', new Blob([p.data], { type: p.type }), p.name);
      await sendForm<typeof concernReportedAnswer>(`/api/permits/${item.permitId}/concerns`, form, { headers });
    }
    return { kind: 'sent' };
  } catch (error) {
    if (!(error instanceof ApiError) || error.status === 0) return { kind: 'stop', problem: noSignal };
    if (error.status === 401) return { kind: 'stop', problem: 'Your sign-in has lapsed: sign in again and it will be sent.' };
    if (error.status >= 500 || error.status === 408 || error.status === 429)
      return { kind: 'stop', problem: 'The server could not take it just now; Brink will try again.' };
    return { kind: 'refused', problem: error.message, fields: error.fields };
  }
}

let running: Promise<OutboxSummary> | null = null;
let queued: Promise<OutboxSummary> | null = null;

interface OutboxSummary {
  sent: number;
  waiting: number;
  refused: number;
}

/**
 * Sends the waiting items of the signed-in person, oldest first, stopping at the first sign of no
 * signal. One run at a time in this page, and (where the browser has Web Locks) one across tabs; a
 * second send of the same item from elsewhere would still count once at the server.
 */
export function flushOutbox(userId: number): Promise<OutboxSummary> {
  if (running) {
    // Items added while a run is under way go in one more run straight after it.
    queued ??= running.then(() => {
      queued = null;
      return flushOutbox(userId);
    });
    return queued;
  }
  const run = async (): Promise<OutboxSummary> => {
    const summary: OutboxSummary = { sent: 0, waiting: 0, refused: 0 };
    let stopped: string | null = null;
    for (const item of await outboxItems(userId)) {
      if (item.state === 'refused') {
        summary.refused++;
        continue;
      }
      if (stopped) {
        await patchItem(item.key, { problem: stopped });
        summary.waiting++;
        continue;
      }
      const outcome = await attempt(item);
      const tried = { attempts: item.attempts + 1, lastTriedAt: new Date().toISOString() };
      if (outcome.kind === 'sent') {
        await del(item.key, store());
        summary.sent++;
        sentTarget.dispatchEvent(new CustomEvent('sent', { detail: item }));
      } else if (outcome.kind === 'refused') {
        await patchItem(item.key, { ...tried, state: 'refused', problem: outcome.problem, fields: outcome.fields });
        summary.refused++;
      } else {
        await patchItem(item.key, { ...tried, problem: outcome.problem });
        summary.waiting++;
        stopped = outcome.problem;
      }
    }
    announce();
    return summary;
  };
  const locks = typeof navigator !== 'undefined' ? navigator.locks : undefined;
  const started: Promise<OutboxSummary> = (locks ? locks.request('brink-outbox', run).then((summary) => summary) : run()).finally(() => {
    running = null;
  });
  running = started;
  return started;
}
