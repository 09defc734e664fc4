import { figuresIn } from '@shared/units';
import { describe, expect, it } from 'vitest';
import type { PermitEvent } from '@shared/schemas/permits';
import { clockTime, timelineLine } from './timeline';

const zone = 'Europe/London';
// 07:00 on the London clock in winter (UTC+0) and in summer (UTC+1).
const winter = '2026-01-12T07:00:00.000Z';
const summer = '2026-07-13T06:00:00.000Z';

function event(over: Partial<PermitEvent>): PermitEvent {
  return {
    id: 1,
    revision: 1,
    at: winter,
    actor: { id: 7, name: 'Sana Whitlock' },
    action: 'submit',
    fromStatus: 'draft',
    toStatus: 'submitted',
    comment: '',
    detail: {},
    ...over,
  };
}
const brink = (name: string) => ({ id: null, name });

describe('timeline lines in plain words', () => {
  it('says who did what', () => {
    expect(timelineLine(event({}), zone)).toBe('Sana Whitlock sent it for review');
    expect(timelineLine(event({ action: 'hand_back' }), zone)).toBe('Sana Whitlock handed it back');
    expect(timelineLine(event({ action: 'return', actor: { id: 3, name: 'Colm Ridley' } }), zone)).toBe(
      'Colm Ridley returned it for changes',
    );
    expect(timelineLine(event({ action: 'revise', revision: 2 }), zone)).toBe('Sana Whitlock opened revision 2 to change it');
    expect(timelineLine(event({ action: 'concern', detail: { excavationReference: 'TR-UX1', photoIds: [4] } }), zone)).toBe(
      'Sana Whitlock reported a concern about TR-UX1',
    );
  });

  it('gives an approval its standoff to 0.01 m, or says it was approved as placed', () => {
    const approve = (standoff: number | null) =>
      event({
        action: 'approve',
        actor: { id: 3, name: 'Colm Ridley' },
        detail: {
          decision: {
            action: 'approve',
            by: { id: 3, name: 'Colm Ridley' },
            at: winter,
            reason: '',
            standoff,
            conditions: [],
            signature: 'Colm Ridley',
          },
        },
      });
    expect(timelineLine(approve(1.5), zone)).toBe('Colm Ridley approved it with a standoff of 1.50 m');
    // 1.5 m = 4.9213 ft (NIST SP 811 B.8: 1 ft = 0.3048 m), a standoff rounded up.
    expect(timelineLine(approve(1.5), zone, figuresIn('us'))).toBe('Colm Ridley approved it with a standoff of 5.0 ft');
    expect(timelineLine(approve(null), zone)).toBe('Colm Ridley approved it as placed on the plan');
  });

  it('says what Brink did by itself on the site clock, not who', () => {
    const start = (at: string, startedBy: string) => event({ action: 'start', at, actor: brink('Brink schedule'), detail: { startedBy } });
    expect(timelineLine(start(winter, 'window'), zone)).toBe('Went live at 07:00 (window opened)');
    expect(timelineLine(start(summer, 'window'), zone)).toBe('Went live at 07:00 (window opened)');
    expect(timelineLine(start('2026-01-12T07:12:00.000Z', 'briefing'), zone)).toBe('Went live at 07:12 (every operator briefed)');
    expect(timelineLine(start('2026-01-12T09:30:00.000Z', 'approval'), zone)).toBe('Went live at 09:30 (approved within its window)');
    expect(timelineLine(event({ action: 'lapse', at: '2026-01-12T18:00:00.000Z', actor: brink('Brink schedule') }), zone)).toBe(
      'Lapsed at 18:00 (window closed)',
    );
    expect(
      timelineLine(
        event({
          action: 'suspend',
          actor: brink('Inspection 7 of TR-UX1: not safe'),
          detail: { inspection: { id: 7, excavationReference: 'TR-UX1' } },
        }),
        zone,
      ),
    ).toBe('Suspended: inspection 7 of TR-UX1 found it not safe');
    expect(timelineLine(event({ action: 'suspend', actor: brink('Re-check after Colm Ridley changed TR-UX1') }), zone)).toBe(
      'Suspended: re-check after Colm Ridley changed TR-UX1',
    );
  });

  it('reads the time of day on the site clock', () => {
    expect(clockTime(summer, zone)).toBe('07:00');
    expect(clockTime(summer, 'UTC')).toBe('06:00');
  });
});
