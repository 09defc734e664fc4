import { afterEach, describe, expect, it, vi } from 'vitest';
import { cleanup, screen, within } from '@testing-library/react';
import { fakePersonIn, renderAt } from '@client/test/render';
import { PersonLinks, PersonMenu } from './PersonMenu';

afterEach(() => {
  cleanup();
  vi.unstubAllGlobals();
});

describe('who is signed in', () => {
  it("names the person's organisation on the menu's button (wide screens)", async () => {
    fakePersonIn('metric');
    renderAt(<PersonMenu />);
    const button = await screen.findByRole('button', { name: /Invented Groundworks/ });
    expect(within(button).getByText('Invented Groundworks')).toBeTruthy();
  });

  it("names it in the person's panel (the menu on phones)", async () => {
    fakePersonIn('metric');
    renderAt(<PersonLinks />);
    expect((await screen.findByText('Organisation:')).parentElement?.textContent).toBe('Organisation: Invented Groundworks');
  });
});
