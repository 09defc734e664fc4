import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { z } from 'zod';
import type { InvitationOffer, signedInAnswer } from '@shared/schemas/auth';
import type { HealthAnswer } from '@shared/schemas/system';
import { api } from '@client/lib/api';
import { setSignedIn, setSignedOut } from '@client/lib/session';

export function useSignIn() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationKey: ['sign-in'],
    mutationFn: (body: { email: string; password: string }) => api.post<z.output<typeof signedInAnswer>>('/api/auth/sign-in', body),
    onSuccess: ({ user }) => setSignedIn(queryClient, user),
  });
}

export function useSignOut() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post<void>('/api/auth/sign-out'),
    onSettled: () => setSignedOut(queryClient),
  });
}

export function useForgotPassword() {
  return useMutation({ mutationFn: (body: { email: string }) => api.post<void>('/api/auth/forgot-password', body) });
}

export function useResetPassword() {
  return useMutation({
    mutationFn: (body: { token: string; password: string }) => api.post<void>('/api/auth/reset-password', body),
  });
}

export type InvitationSummary = InvitationOffer;

export function useInvitation(token: string | null) {
  return useQuery({
    queryKey: ['invitation', token],
    queryFn: ({ signal }) => api.get<InvitationOffer>(`/api/invitations/${encodeURIComponent(token ?? '')}`, signal),
    enabled: token !== null,
    retry: false,
  });
}

export function useAcceptInvitation() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { token: string; name: string; password: string }) =>
      api.post<z.output<typeof signedInAnswer>>('/api/invitations/accept', body),
    onSuccess: ({ user }) => setSignedIn(queryClient, user),
  });
}

/** Whether this server runs with the demo people; only then does the sign-in page list them. */
export function useDemoMode() {
  return useQuery({
    queryKey: ['health'],
    queryFn: ({ signal }) => api.get<HealthAnswer>('/api/health', signal),
    select: (health) => health?.demo === true,
    retry: false,
    staleTime: Infinity,
  });
}
