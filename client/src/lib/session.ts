import { useQuery, type QueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { Me, signedInAnswer } from '@shared/schemas/auth';
import type { SiteRole } from '@shared/schemas/common';
import { mayInspect } from '@shared/inspectionDuty';
import type { sitesAnswer } from '@shared/schemas/sites';
import { api, isApiError } from './api';

/** Query keys shared by the app and more than one feature. */
export const sessionKeys = {
  me: ['me'] as const,
  sites: ['sites'] as const,
};

/** Who is signed in: GET /api/auth/me (null when signed out). */
const meQuery = {
  queryKey: sessionKeys.me,
  queryFn: async ({ signal }: { signal: AbortSignal }): Promise<Me | null> => {
    try {
      const { user } = await api.get<z.output<typeof signedInAnswer>>('/api/auth/me', signal);
      return user;
    } catch (error) {
      if (isApiError(error, 401)) return null;
      throw error;
    }
  },
  staleTime: 5 * 60_000,
};

/** The signed-in person, or null when signed out. */
export function useMe() {
  return useQuery(meQuery);
}

/**
 * Asks who is signed in as soon as the app starts, while the page's own code is still loading
 * (every page waits for the answer; on a slow phone the round trip then overlaps the download).
 * A failure is left to the page's own query, which asks again.
 */
export function askWhoIsSignedIn(queryClient: QueryClient): void {
  void queryClient.prefetchQuery(meQuery);
}

/** Records the person after sign-in or accepting an invitation, and drops data of anyone before. */
export function setSignedIn(queryClient: QueryClient, user: Me) {
  queryClient.removeQueries({ predicate: (q) => q.queryKey[0] !== sessionKeys.me[0] });
  queryClient.setQueryData(sessionKeys.me, user);
}

/** Announced on sign-out, so that parts of the app that keep copies on the device can forget them. */
export const SIGNED_OUT_EVENT = 'brink:signed-out';

export function setSignedOut(queryClient: QueryClient) {
  queryClient.clear();
  queryClient.setQueryData(sessionKeys.me, null);
  window.dispatchEvent(new Event(SIGNED_OUT_EVENT));
}

/** The sites I am a member of (every site, for an administrator). */
export function useMySites(enabled = true) {
  return useQuery({
    queryKey: sessionKeys.sites,
    queryFn: ({ signal }) => api.get<z.output<typeof sitesAnswer>>('/api/sites', signal).then((r) => r.sites),
    enabled,
  });
}

/** My role on a site, or null when I hold none there (an administrator may still see it). */
export function roleOnSite(me: Me, siteId: number): SiteRole | null {
  return me.memberships.find((m) => m.siteId === siteId)?.role ?? null;
}

/** Whether I may record an inspection on the site (`mayInspect`, shared/inspectionDuty.ts). */
export function mayInspectOn(me: Me | null | undefined, siteId: number): boolean {
  return mayInspect(me?.memberships.find((m) => m.siteId === siteId));
}

const storageKey = (userId: number) => `brink.currentSite.${userId}`;

/** The site this person last chose on this device, if any. */
export function rememberedSiteId(userId: number): number | null {
  try {
    const raw = window.localStorage.getItem(storageKey(userId));
    const id = raw === null ? NaN : Number(raw);
    return Number.isInteger(id) && id > 0 ? id : null;
  } catch {
    return null;
  }
}

export function rememberSiteId(userId: number, siteId: number) {
  try {
    window.localStorage.setItem(storageKey(userId), String(siteId));
  } catch {
    // Private browsing or storage full: the URL still carries the site.
  }
}

/** Reads a positive whole-number id from a route parameter; null when it is not one. */
export function parseId(value: string | undefined): number | null {
  const id = Number(value);
  return Number.isInteger(id) && id > 0 ? id : null;
}
