import { describe, expect, it } from 'vitest';
import type { FieldErrors } from 'react-hook-form';
import { ApiError } from './api';
import { z } from 'zod';
import { invitationSchema } from '@shared/schemas/auth';
import { excavationFields } from '@shared/schemas/excavations';
import { commentSchema, transitionSchema } from '@shared/schemas/permits';
import { applyServerErrors, errorPaths, fieldSentence, maxLengths } from './forms';
import { fieldLabel, fieldsSummary, serverSummary } from './fieldLabels';

describe('fieldSentence', () => {
  it('joins a reason that reads on from the label', () => {
    expect(fieldSentence('E-mail', 'is required')).toBe('E-mail is required.');
    expect(fieldSentence('Minimum edge clearance (m)', 'must be at most 10 m')).toBe('Minimum edge clearance (m) must be at most 10 m.');
  });

  it('shows any other reason as a sentence of its own', () => {
    expect(fieldSentence('Role', 'give both a site and a role, or neither')).toBe('Give both a site and a role, or neither.');
    expect(fieldSentence('Password', 'Too short.')).toBe('Too short.');
  });
});

describe('applyServerErrors', () => {
  it('puts list items the server names as a[0].b on the form field a.0.b, and the rest in the summary', () => {
    const set: Record<string, string | undefined> = {};
    const setError = ((name: string, e: { message?: string }) => {
      set[name] = e.message;
    }) as Parameters<typeof applyServerErrors>[1];
    const error = new ApiError(400, 'invalid', 'Please correct the request.', {
      'soil[1].top': 'repeats the top of soil[0] (0 m)',
      depth: 'must be greater than 0 m',
      geometry: 'must not cross itself',
    });
    const summary = applyServerErrors(error, setError, ['soil', 'depth'], { geometry: 'The shape' });
    expect(set).toEqual({ 'soil.1.top': 'repeats the top of soil[0] (0 m)', depth: 'must be greater than 0 m' });
    expect(summary).toBe('Correct the 2 fields marked below. The shape must not cross itself.');
  });
});

describe('serverSummary and fieldLabel: the API refusals in the words of the forms, each said once', () => {
  it('names loads, dig checks and import features by their labels, never by their paths', () => {
    expect(fieldLabel('loads[0].unitWeight')).toBe('Load 1: Unit weight (kN/m³)');
    expect(fieldLabel('loads[2].height')).toBe('Load 3: Height (m)');
    expect(fieldLabel('windowEnd')).toBe('Window closes');
    expect(fieldLabel('features[1].supportType')).toBe('Feature 2: Support');
    expect(fieldLabel('dig.servicesChecks.locatorScan.by')).toBe('Cable-locator scan: Who did it');
    expect(fieldLabel('someNewField')).toBe('Some new field');
  });

  it('turns "Please correct the request: loads[0].unitWeight Invalid input" into words', () => {
    const e = new ApiError(400, 'invalid', 'Please correct the request: loads[0].unitWeight is required', {
      'loads[0].unitWeight': 'is required',
    });
    expect(serverSummary(e)).toBe('Load 1: Unit weight (kN/m³) is required.');
    expect(serverSummary(e)).not.toMatch(/loads\[|Invalid input|Please correct/);
  });

  it('says a reason shown next to its field once: the summary only points to it', () => {
    const e = new ApiError(400, 'invalid', 'The decision was not signed: the password is not yours.', {
      password: 'is not the one you sign in with: type it again',
    });
    const summary = serverSummary(e, (k) => k === 'password');
    expect(summary).toBe('Correct the field marked below.');
    expect(summary).not.toMatch(/password/i);
    expect(fieldSentence(fieldLabel('password'), e.fields.password)).toBe('Password is not the one you sign in with: type it again.');
  });

  it('says "Window closes must be after the window opens", not "windowEnd must be after the start"', () => {
    const e = new ApiError(400, 'invalid', 'Please correct the request: windowEnd must be after the window opens', {
      windowEnd: 'must be after the window opens',
    });
    expect(serverSummary(e)).toBe('Window closes must be after the window opens.');
  });

  it("keeps the server's own sentence when it names no field", () => {
    expect(serverSummary(new ApiError(409, 'conflict', 'Someone else changed this permit.'))).toBe('Someone else changed this permit.');
  });
});

describe('errorPaths', () => {
  it("names nested form errors as the API names fields, so the form's own refusals read like the server's", () => {
    // The shape react-hook-form gives after the shared schema refused a request.
    const errors: FieldErrors<{
      windowEnd: string;
      loads: { height: number }[];
      dig: { servicesChecks: { drawings: { by: string } } };
      operatorIds: number[];
    }> = {
      windowEnd: { type: 'custom', message: 'must be after the window opens' },
      loads: [undefined, { height: { type: 'invalid_type', message: 'is required: type a figure' } }],
      dig: { servicesChecks: { drawings: { by: { type: 'custom', message: 'who did it is required once it is done' } } } },
      operatorIds: { type: 'too_big', message: 'must list at most 20' },
    };
    const flat = errorPaths(errors);
    expect(flat).toEqual({
      windowEnd: 'must be after the window opens',
      'loads[1].height': 'is required: type a figure',
      'dig.servicesChecks.drawings.by': 'who did it is required once it is done',
      operatorIds: 'must list at most 20',
    });
    // The fields the page shows stand by their boxes; the others are spelt out by their labels.
    expect(fieldsSummary(flat, (p) => p === 'windowEnd' || p.startsWith('loads'))).toBe(
      'Correct the 2 fields marked below. Who did it is required once it is done. Operators to brief must list at most 20.',
    );
  });
});

describe('maxLengths', () => {
  it('reads each text field’s limit from the shared schema, through defaults and optionals', () => {
    // The limits written in shared/schemas (excavations.ts, permits.ts).
    expect(maxLengths(excavationFields)).toMatchObject({ reference: 40, name: 120, designReference: 200, notes: 4000 });
    expect(maxLengths(transitionSchema.shape).reason).toBe(4000);
    expect(maxLengths(commentSchema.shape).text).toBe(4000);
    // An e-mail address: 254 characters before its transform (shared/schemas/common.ts).
    expect(maxLengths(invitationSchema.shape)).toMatchObject({ email: 254, name: 120 });
  });

  it('gives no limit to a field without one, or that is not text', () => {
    const limits = maxLengths({ free: z.string(), count: z.number().max(3), maybe: z.string().max(9).nullable().default(null) });
    expect(limits).toEqual({ maybe: 9 });
  });
});
