import { useEffect, useState } from 'react';
import { useSearchParams } from 'react-router-dom';

/** How long typing must pause before a search is sent (ms). */
const SEARCH_PAUSE_MS = 300;

/**
 * A list's text search kept in the page's address (`?q=`), so a reload or a shared link keeps it:
 * `search` is what the box holds, `q` what is searched (trimmed), which follows the box once typing
 * pauses.
 */
export function useUrlSearch() {
  const [params, setParams] = useSearchParams();
  const q = params.get('q') ?? '';
  const [search, setSearch] = useState(q);
  useEffect(() => {
    const wanted = search.trim();
    if (wanted === q) return;
    const timer = setTimeout(
      () =>
        setParams(
          (prev) => {
            const next = new URLSearchParams(prev);
            if (wanted) next.set('q', wanted);
            else next.delete('q');
            return next;
          },
          { replace: true },
        ),
      SEARCH_PAUSE_MS,
    );
    return () => clearTimeout(timer);
  }, [search, q, setParams]);
  return { q, search, setSearch };
}
