import { useQuery } from '@tanstack/react-query';
import type { z } from 'zod';
import type { caughtMailAnswer, CaughtMessage } from '@shared/schemas/system';
import { api } from '@client/lib/api';

export type { CaughtMessage };

const mailKey = ['dev-mail'] as const;

/** Mail kept by the local mail catcher. The endpoint answers 404 when the catcher is off. */
export function useCaughtMail(enabled = true) {
  return useQuery({
    queryKey: mailKey,
    queryFn: ({ signal }) => api.get<z.output<typeof caughtMailAnswer>>('/api/dev/mail', signal).then((r) => r.messages),
    enabled,
    retry: false,
  });
}

/** True only once the mail catcher has answered; the menu link to caught mail depends on it. */
export function useMailCatcherOn(enabled: boolean) {
  const mail = useCaughtMail(enabled);
  return mail.isSuccess;
}
