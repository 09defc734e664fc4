import { useQueryClient } from '@tanstack/react-query';
import { useCallback, useEffect, useState } from 'react';
import { fieldKeys } from '../api/permits';
import { flushOutbox, onOutboxChange, onOutboxSent, outboxItems, type OutboxItem } from '../offline/outbox';

/** The outbox of one person, kept current as items are added, sent or refused (also from other tabs). */
export function useOutbox(userId: number): OutboxItem[] {
  const [items, setItems] = useState<OutboxItem[]>([]);
  useEffect(() => {
    let live = true;
    const load = (): void => {
      outboxItems(userId)
        .then((all) => live && setItems(all))
        .catch(() => undefined);
    };
    load();
    const off = onOutboxChange(load);
    return () => {
      live = false;
      off();
    };
  }, [userId]);
  return items;
}

/** How often waiting items are tried again while the page is open (the browser's online event also triggers a try). */
const RETRY_MS = 20_000;

/**
 * Sends the outbox: when the field view opens, when the browser regains its connection or the page
 * comes back into view, and every RETRY_MS while something waits. Refreshes the field data when
 * something has gone through.
 */
export function useOutboxSender(userId: number, waiting: number): () => void {
  const client = useQueryClient();
  const flush = useCallback(() => {
    void flushOutbox(userId).catch(() => undefined);
  }, [userId]);
  useEffect(() => onOutboxSent(() => void client.invalidateQueries({ queryKey: fieldKeys.all })), [client]);
  useEffect(() => {
    flush();
    const visible = () => document.visibilityState === 'visible' && flush();
    window.addEventListener('online', flush);
    document.addEventListener('visibilitychange', visible);
    return () => {
      window.removeEventListener('online', flush);
      document.removeEventListener('visibilitychange', visible);
    };
  }, [flush]);
  useEffect(() => {
    if (!waiting) return;
    const id = window.setInterval(flush, RETRY_MS);
    return () => window.clearInterval(id);
  }, [flush, waiting]);
  return flush;
}
