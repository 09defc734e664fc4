import { useId } from 'react';
import { useLocation, useNavigate } from 'react-router-dom';
import { switchSitePath, useCurrentSite } from '@client/lib/currentSite';
import { rememberSiteId, useMe } from '@client/lib/session';

/** Chooses the site the pages are about. Kept on this device for next time. */
export function SiteSwitcher({ className = '' }: { className?: string }) {
  const id = useId();
  const me = useMe();
  const { siteId, sites } = useCurrentSite();
  const navigate = useNavigate();
  const { pathname } = useLocation();
  if (!me.data || sites.length === 0) return null;

  return (
    <div className={`flex items-center gap-2 ${className}`}>
      <label htmlFor={id} className="font-semibold">
        Site
      </label>
      <select
        id={id}
        className="min-h-11 w-full min-w-0 rounded-md border border-rule-strong bg-sheet px-3 text-base md:w-64"
        value={siteId ?? ''}
        onChange={(e) => {
          const next = Number(e.target.value);
          rememberSiteId(me.data!.id, next);
          void navigate(pathname.startsWith('/sites/') ? switchSitePath(pathname, next) : `/sites/${next}`);
        }}
      >
        {sites.map((s) => (
          <option key={s.id} value={s.id}>
            {s.name}
          </option>
        ))}
      </select>
    </div>
  );
}
