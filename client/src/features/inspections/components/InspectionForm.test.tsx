import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, fireEvent, screen, waitFor, within } from '@testing-library/react';
import { checklist, type InspectionData } from '@shared/schemas/inspections';
import { ApiError } from '@client/lib/api';
import { renderAt } from '@client/test/render';
import type { RecordedInspection } from '../api/inspections';
import { InspectionForm } from './InspectionForm';

// IndexedDB stand-in: jsdom has none; the draft store talks to idb-keyval only.
const kept = vi.hoisted(() => new Map<string, unknown>());
vi.mock('idb-keyval', () => ({
  get: async (k: string) => kept.get(k),
  set: async (k: string, v: unknown) => void kept.set(k, structuredClone(v)),
  del: async (k: string) => void kept.delete(k),
}));

afterEach(() => {
  kept.clear();
  cleanup();
  vi.restoreAllMocks();
});

function choose(group: string, answer: string) {
  fireEvent.click(within(screen.getByRole('group', { name: group })).getByLabelText(answer));
}

function typeInto(label: string, value: string) {
  fireEvent.change(screen.getByLabelText(label), { target: { value } });
}

function answerAll(answer = 'Pass') {
  for (const c of checklist) choose(c.label, answer);
}

const recorded = {
  inspection: { id: 5, outcome: 'not-safe' },
  consequences: { suspended: [], notSuspended: [], notified: [] },
} as unknown as RecordedInspection;

async function renderForm(send: (d: InspectionData, p: Blob[]) => Promise<RecordedInspection>, onRecorded = vi.fn()) {
  renderAt(<InspectionForm userId={1} excavationId={7} reference="T1" send={send} onRecorded={onRecorded} />);
  await screen.findByRole('form', { name: 'Inspection of T1' });
  return onRecorded;
}

describe('InspectionForm', () => {
  it('names every unanswered question and sends nothing', async () => {
    const send = vi.fn();
    await renderForm(send);
    fireEvent.click(screen.getByRole('button', { name: 'Record the inspection' }));
    const summary = await screen.findByText(/^Not sent yet: 10 answers need attention\./);
    expect(summary.textContent).toContain('Why: choose why the excavation is being inspected.');
    expect(summary.textContent).toContain('Support members: choose pass, fail or not applicable.');
    expect(summary.textContent).toContain('Outcome: choose safe to work or not safe.');
    expect(within(screen.getByRole('group', { name: 'Water' })).getByText('Water: choose pass, fail or not applicable.')).toBeTruthy();
    expect(send).not.toHaveBeenCalled();
  });

  it('asks for a note on a fail and for what must be put right when not safe', async () => {
    const send = vi.fn();
    await renderForm(send);
    choose('Why', 'Start of shift');
    answerAll();
    choose('Support members', 'Fail');
    choose('Outcome', 'Not safe: stop work');
    expect(screen.getByText(/suspends every live permit on T1 at once/)).toBeTruthy();
    fireEvent.click(screen.getByRole('button', { name: 'Record the inspection' }));
    expect(await screen.findByText('Support members note is required for a fail: say what is wrong.')).toBeTruthy();
    expect(screen.getByText('Remarks is required when not safe: say what must be put right.')).toBeTruthy();
    expect(send).not.toHaveBeenCalled();
  });

  it('sends a complete form and hands back what was recorded', async () => {
    const send = vi.fn(async () => recorded);
    const onRecorded = await renderForm(send);
    choose('Why', 'After a fall of material');
    typeInto('What happened', 'Spoil slipped in at chainage 40');
    answerAll();
    choose('Atmosphere', 'Not applicable');
    choose('Support members', 'Fail');
    typeInto('Support members note', 'Bottom strut knocked out');
    choose('Outcome', 'Not safe: stop work');
    typeInto('Remarks', 'Re-fit the strut before anyone goes in');
    fireEvent.click(screen.getByRole('button', { name: 'Record the inspection' }));
    await waitFor(() => expect(onRecorded).toHaveBeenCalledWith(recorded));
    const [data, photos] = send.mock.calls[0] as unknown as [InspectionData, Blob[]];
    expect(data).toMatchObject({
      reason: 'after-fall',
      reasonDetail: 'Spoil slipped in at chainage 40',
      outcome: 'not-safe',
      remarks: 'Re-fit the strut before anyone goes in',
      checklist: {
        support: { answer: 'fail', note: 'Bottom strut knocked out' },
        atmosphere: { answer: 'na', note: '' },
        water: { answer: 'pass', note: '' },
      },
    });
    expect(data.clientRef).toMatch(/^[0-9a-f-]{36}$/);
    expect(photos).toEqual([]);
  });

  it('keeps every answer when there is no signal, and offers to send again with the same form id', async () => {
    const send = vi.fn(async (): Promise<RecordedInspection> => {
      throw new ApiError(0, 'network', 'No connection: the inspection was not sent.');
    });
    const onRecorded = await renderForm(send);
    choose('Why', 'Start of shift');
    answerAll();
    choose('Outcome', 'Safe to work');
    typeInto('Remarks', 'Dry and tight');
    fireEvent.click(screen.getByRole('button', { name: 'Record the inspection' }));
    expect(await screen.findByText('No connection: the inspection was not sent.')).toBeTruthy();
    expect((screen.getByLabelText('Remarks') as HTMLTextAreaElement).value).toBe('Dry and tight');
    expect((within(screen.getByRole('group', { name: 'Water' })).getByLabelText('Pass') as HTMLInputElement).checked).toBe(true);
    fireEvent.click(screen.getByRole('button', { name: 'Send again' }));
    await waitFor(() => expect(send).toHaveBeenCalledTimes(2));
    const refs = send.mock.calls.map((c) => (c as unknown as [InspectionData])[0].clientRef);
    expect(refs[0]).toBe(refs[1]);
    expect(onRecorded).not.toHaveBeenCalled();
  });

  it('puts the server\u2019s reasons under their fields and keeps what was typed', async () => {
    const send = vi.fn(async (): Promise<RecordedInspection> => {
      throw new ApiError(400, 'invalid', 'Please correct the inspection.', {
        inspectedAt: 'is before the latest inspection of this excavation',
        'photos[0]': 'must be a PNG or JPEG image',
      });
    });
    await renderForm(send);
    choose('Why', 'Start of shift');
    answerAll();
    choose('Outcome', 'Safe to work');
    typeInto('Time of the inspection', '2026-03-30T06:40');
    fireEvent.click(screen.getByRole('button', { name: 'Record the inspection' }));
    expect(await screen.findByText('Time of the inspection is before the latest inspection of this excavation.')).toBeTruthy();
    expect(screen.getByText(/Photo 1 \(unnamed\) must be a PNG or JPEG image\./)).toBeTruthy();
    expect((screen.getByLabelText('Time of the inspection') as HTMLInputElement).value).toBe('2026-03-30T06:40');
  });

  it('keeps the answers on the phone: a closed and reopened form still has them, and a sent one is cleared', async () => {
    const send = vi.fn(async () => recorded);
    await renderForm(send);
    choose('Why', 'After an event that may have weakened it (rain, vibration, a strike, frost)');
    typeInto('What happened', 'Heavy rain overnight');
    choose('Water', 'Fail');
    typeInto('Water note', 'Ponding at formation level');
    await waitFor(() => expect([...kept.keys()]).toEqual(['brink.inspection-draft.1.7']));
    await waitFor(() => expect(JSON.stringify(kept.get('brink.inspection-draft.1.7'))).toContain('Ponding at formation level'));
    cleanup();

    await renderForm(send);
    expect((screen.getByLabelText('What happened') as HTMLTextAreaElement).value).toBe('Heavy rain overnight');
    expect((screen.getByLabelText('Water note') as HTMLTextAreaElement).value).toBe('Ponding at formation level');
    expect((within(screen.getByRole('group', { name: 'Water' })).getByLabelText('Fail') as HTMLInputElement).checked).toBe(true);
    answerAll();
    choose('Outcome', 'Safe to work');
    fireEvent.click(screen.getByRole('button', { name: 'Record the inspection' }));
    await waitFor(() => expect(send).toHaveBeenCalledTimes(1));
    await waitFor(() => expect(kept.size).toBe(0));
  });
});
