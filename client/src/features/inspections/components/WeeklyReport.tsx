import { useState } from 'react';
import { isoWeekAt, isoWeekPattern } from '@shared/time/shifts';
import { TextField } from '@client/components/Fields';
import { buttonClass } from '@client/components/Button';

/** Choose an ISO week and open the site's weekly inspection report (PDF). */
export function WeeklyReport({ siteId, timeZone }: { siteId: number; timeZone: string }) {
  const [week, setWeek] = useState(() => isoWeekAt(new Date(), timeZone));
  const valid = isoWeekPattern.test(week);
  return (
    <div className="flex flex-wrap items-end gap-3">
      <TextField
        label="Week"
        type="week"
        hint="As year and week number, e.g. 2026-W14."
        value={week}
        onChange={(e) => setWeek(e.target.value)}
        error={valid ? undefined : 'must be a week such as 2026-W14'}
      />
      <a
        className={buttonClass('primary')}
        href={valid ? `/api/sites/${siteId}/inspections/report.pdf?week=${encodeURIComponent(week)}` : undefined}
        aria-disabled={!valid}
        target="_blank"
        rel="noreferrer"
      >
        Open the weekly report (PDF)
      </a>
    </div>
  );
}
