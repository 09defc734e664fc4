import { createStore, del, get, keys, set, type UseStore } from 'idb-keyval';
import type { FieldPermitAnswer, FieldPermitsAnswer } from '@shared/schemas/field';
import type { Me } from '@shared/schemas/auth';

/**
 * The copies kept on the phone for reading with no signal, in IndexedDB (database `brink-field`):
 * who last signed in here, and per person the last answer of "my permits" and of each permit opened
 * (with the server's time of that answer). Cleared on sign-out; the outbox lives apart
 * (offline/outbox.ts) and is never cleared with the copies.
 */
let copies: UseStore | null = null;
function store(): UseStore {
  copies ??= createStore('brink-field', 'copies');
  return copies;
}

/** Who last signed in on this phone (from the sign-in answer). */
/** Who uses the phone, as kept on it (a copy kept before organisations has no organisation's name). */
export type SavedPerson = Pick<Me, 'id' | 'name' | 'email'> & { organisationName?: string };

/** A permit as kept on the phone: the server's answer, with the time it gave it out. */
type SavedPermit = FieldPermitAnswer;

const meKey = 'me';
const listKey = (userId: number) => `permits:${userId}`;
const permitKey = (userId: number, permitId: number) => `permit:${userId}:${permitId}`;

export async function savePerson(person: Pick<Me, 'id' | 'name' | 'email' | 'organisation'>): Promise<void> {
  const saved: SavedPerson = { id: person.id, name: person.name, email: person.email, organisationName: person.organisation.name };
  await set(meKey, saved, store());
}

export async function savedPerson(): Promise<SavedPerson | null> {
  return (await get<SavedPerson>(meKey, store())) ?? null;
}

/** Keeps the list and each permit in it (so any of them opens with no signal). */
export async function saveMyPermits(userId: number, answer: FieldPermitsAnswer): Promise<void> {
  await set(listKey(userId), answer, store());
  await Promise.all(answer.permits.map((permit) => savePermit(userId, { asOf: answer.asOf, permit })));
}

export async function savedMyPermits(userId: number): Promise<FieldPermitsAnswer | null> {
  return (await get<FieldPermitsAnswer>(listKey(userId), store())) ?? null;
}

/** Keeps one permit unless a newer copy is already kept. */
export async function savePermit(userId: number, saved: SavedPermit): Promise<void> {
  const old = await get<SavedPermit>(permitKey(userId, saved.permit.id), store());
  if (old && old.asOf > saved.asOf) return;
  await set(permitKey(userId, saved.permit.id), saved, store());
}

export async function savedPermit(userId: number, permitId: number): Promise<SavedPermit | null> {
  return (await get<SavedPermit>(permitKey(userId, permitId), store())) ?? null;
}

/** Forgets every copy (sign-out, or another person signing in on this phone). */
export async function forgetCopies(): Promise<void> {
  const all = await keys(store());
  await Promise.all(all.map((k) => del(k, store())));
}
