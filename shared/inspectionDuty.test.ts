import { describe, expect, it } from 'vitest';
import { mayInspect } from './inspectionDuty';

// The inspection duty as the product defines it (docs/inspections.md): supervisors and coordinators of
// a site always inspect; an operator only where the site gives them the duty.
describe('who may record an inspection', () => {
  it('supervisors and coordinators always; operators only with the duty; nobody without a role on the site', () => {
    expect(mayInspect({ role: 'supervisor', canInspect: false })).toBe(true);
    expect(mayInspect({ role: 'coordinator', canInspect: false })).toBe(true);
    expect(mayInspect({ role: 'operator', canInspect: true })).toBe(true);
    expect(mayInspect({ role: 'operator', canInspect: false })).toBe(false);
    // An administrator with no role on the site, or no membership at all.
    expect(mayInspect({ role: null, canInspect: true })).toBe(false);
    expect(mayInspect(null)).toBe(false);
    expect(mayInspect(undefined)).toBe(false);
  });
});
