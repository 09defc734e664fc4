import { describe, expect, it } from 'vitest';
import type { Me } from '@shared/schemas/auth';
import { visibleNavLinks, type NavItem } from './nav';

const items: NavItem[] = [
  { label: 'Dashboard', to: '/sites/:siteId', end: true },
  { label: 'Register', to: '/sites/:siteId/register', who: ['coordinator'] },
  { label: 'People', to: '/admin/people', who: 'admin' },
];

const operator: Me = {
  id: 7,
  email: 'op@example.test',
  name: 'Op',
  isAdmin: false,
  organisation: { id: 1, name: 'Invented Groundworks' },
  units: null,
  memberships: [
    { siteId: 1, siteName: 'One', role: 'operator', canInspect: false },
    { siteId: 2, siteName: 'Two', role: 'coordinator', canInspect: true },
  ],
};

describe('visibleNavLinks', () => {
  it('fills in the current site and keeps role links to that role on that site', () => {
    expect(visibleNavLinks(items, operator, 1).map((l) => l.to)).toEqual(['/sites/1']);
    expect(visibleNavLinks(items, operator, 2).map((l) => l.to)).toEqual(['/sites/2', '/sites/2/register']);
  });

  it('hides site links when there is no current site', () => {
    expect(visibleNavLinks(items, { ...operator, isAdmin: true }, null).map((l) => l.label)).toEqual(['People']);
  });

  it('shows administrators every link', () => {
    const admin = { ...operator, isAdmin: true, memberships: [] };
    expect(visibleNavLinks(items, admin, 3).map((l) => l.label)).toEqual(['Dashboard', 'Register', 'People']);
  });
});
