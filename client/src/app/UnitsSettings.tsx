import { useId } from 'react';
import { unitSystemLabels, unitSystems, type UnitSystem } from '@shared/units';
import { errorMessage } from '@client/lib/api';
import { useCurrentSite } from '@client/lib/currentSite';
import { roleOnSite, useMe } from '@client/lib/session';
import { useChooseMyUnits, useSetSiteUnits } from '@client/lib/units';

const FOLLOW = 'site';

/**
 * The person's own units (or the site's default), and, for the site's coordinators and administrators,
 * the site's default units. Figures everywhere follow at once (docs/calculation.md, "Units").
 */
export function UnitsSettings() {
  const me = useMe().data;
  const { site } = useCurrentSite();
  const mine = useChooseMyUnits();
  const siteUnits = useSetSiteUnits();
  const myId = useId();
  const siteId = useId();
  if (!me) return null;
  const canSetSite = site !== null && (me.isAdmin || roleOnSite(me, site.id) === 'coordinator');
  const select = 'min-h-11 rounded-md border border-rule bg-sheet px-2';
  return (
    <div className="flex flex-col gap-2 text-sm">
      <label htmlFor={myId} className="font-semibold">
        My units
      </label>
      <select
        id={myId}
        className={select}
        value={me.units ?? FOLLOW}
        disabled={mine.isPending}
        onChange={(e) => mine.mutate(e.target.value === FOLLOW ? null : (e.target.value as UnitSystem))}
      >
        <option value={FOLLOW}>As the site{site ? ` (${unitSystemLabels[site.units]})` : ''}</option>
        {unitSystems.map((u) => (
          <option key={u} value={u}>
            {unitSystemLabels[u]}
          </option>
        ))}
      </select>
      {canSetSite ? (
        <>
          <label htmlFor={siteId} className="font-semibold">
            Default units of {site.name}
          </label>
          <select
            id={siteId}
            className={select}
            value={site.units}
            disabled={siteUnits.isPending}
            onChange={(e) => siteUnits.mutate({ siteId: site.id, units: e.target.value as UnitSystem })}
          >
            {unitSystems.map((u) => (
              <option key={u} value={u}>
                {unitSystemLabels[u]}
              </option>
            ))}
          </select>
        </>
      ) : null}
      {mine.isError || siteUnits.isError ? <p role="alert">{errorMessage(mine.error ?? siteUnits.error)}</p> : null}
    </div>
  );
}
