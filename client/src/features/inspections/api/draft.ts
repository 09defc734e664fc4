import { del, get, set } from 'idb-keyval';
import type { InspectionInput } from '@shared/schemas/inspections';

/**
 * The form as typed so far, kept on the phone (IndexedDB) with its photos, so that nothing is lost
 * to a closed tab, a dead battery, a lost signal or a refused send. Cleared once the server has it.
 */
interface InspectionDraft {
  values: FormValues;
  photos: DraftPhoto[];
  /** Made when the form first opens; the server records a form with the same ref only once. */
  clientRef: string;
  savedAt: string;
}

export interface DraftPhoto {
  id: string;
  name: string;
  blob: Blob;
}

/** What the form holds: the input with text where the person may not have chosen yet. */
export type FormValues = Omit<InspectionInput, 'reason' | 'outcome' | 'checklist' | 'clientRef'> & {
  reason: InspectionInput['reason'] | '';
  outcome: InspectionInput['outcome'] | '';
  checklist: Record<string, { answer: 'pass' | 'fail' | 'na' | ''; note: string }>;
};

const key = (userId: number, excavationId: number) => `brink.inspection-draft.${userId}.${excavationId}`;

export async function loadDraft(userId: number, excavationId: number): Promise<InspectionDraft | null> {
  try {
    return ((await get(key(userId, excavationId))) as InspectionDraft | undefined) ?? null;
  } catch {
    return null; // private browsing or no IndexedDB: the form still works, without a kept draft
  }
}

export async function saveDraft(userId: number, excavationId: number, draft: InspectionDraft): Promise<boolean> {
  try {
    await set(key(userId, excavationId), draft);
    return true;
  } catch {
    return false;
  }
}

export async function clearDraft(userId: number, excavationId: number): Promise<void> {
  try {
    await del(key(userId, excavationId));
  } catch {
    // nothing kept, nothing to clear
  }
}
