import { describe, expect, it } from 'vitest';
import type { FieldPermit } from '@shared/schemas/field';
import { groupPermits } from './MyPermitsPage';

const now = new Date(2026, 5, 10, 9, 0);
const at = (day: number, hour: number) => new Date(2026, 5, day, hour, 0).toISOString();
const permit = (id: number, start: string, end: string, status: FieldPermit['status'] = 'approved') =>
  ({ id, windowStart: start, windowEnd: end, status }) as FieldPermit;

describe('my permits, today first', () => {
  it('puts windows that touch today first, then those to come, then closed ones', () => {
    const groups = groupPermits(
      [
        permit(1, at(11, 7), at(11, 17)), // tomorrow
        permit(2, at(10, 7), at(10, 17)), // today
        permit(3, at(9, 20), at(10, 2)), // overnight into today
        permit(4, at(10, 6), at(10, 8), 'handed_back'),
      ],
      now,
    );
    expect(groups.map((g) => [g.title, g.permits.map((p) => p.id)])).toEqual([
      ['Today', [2, 3]],
      ['Coming up', [1]],
      ['Closed', [4]],
    ]);
  });

  it('leaves out empty groups', () => {
    expect(groupPermits([permit(5, at(12, 7), at(12, 17))], now).map((g) => g.title)).toEqual(['Coming up']);
  });
});
