import { permitErrorSummary } from '../components/fieldNames';
import { useState } from 'react';
import { useNavigate, useParams } from 'react-router-dom';
import { Button } from '@client/components/Button';
import { CheckboxField, FormSummary, SelectField, TextField } from '@client/components/Fields';
import { Page, Panel } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { ApiError, errorMessage } from '@client/lib/api';
import { parseId } from '@client/lib/session';
import { useCreatePermit, useExcavations } from '../api/permits';
import { fromLocalInput, toLocalInput } from '../components/time';

/** The first step of a request: its kind, the excavations, the window and the work; the loads are placed next. */
export function NewPermitPage() {
  const siteId = parseId(useParams().siteId) ?? 0;
  const navigate = useNavigate();
  const excavations = useExcavations(siteId);
  const create = useCreatePermit();
  const [kind, setKind] = useState<'load' | 'dig'>('load');
  const [description, setDescription] = useState('');
  const [start, setStart] = useState(() => toLocalInput(new Date(Date.now() + 15 * 60_000).toISOString()));
  const [end, setEnd] = useState(() => toLocalInput(new Date(Date.now() + 8 * 3600_000).toISOString()));
  const [ids, setIds] = useState<number[]>([]);
  const [error, setError] = useState<string | null>(null);
  const [fields, setFields] = useState<Record<string, string>>({});

  async function go() {
    setError(null);
    try {
      const p = await create.mutateAsync({ siteId, kind, description, windowStart: fromLocalInput(start), windowEnd: fromLocalInput(end), excavationIds: ids });
      void navigate(`/permits/${p.id}/edit`);
    } catch (e) {
      if (e instanceof ApiError) {
        setFields(e.fields);
        setError(permitErrorSummary(e));
      } else setError(errorMessage(e));
    }
  }

  if (excavations.isPending) return <Loading what="Loading the excavations" />;
  if (excavations.isError) return <LoadError error={excavations.error} />;
  return (
    <Page title="Ask for a permit" intro="Say what the work is, where and when. Next you place the loads on the map and see the check.">
      <form onSubmit={(e) => { e.preventDefault(); void go(); }} className="flex flex-col gap-4">
        <FormSummary message={error} />
        <Panel title="The request">
          <SelectField label="Kind of permit" value={kind} onChange={(e) => setKind(e.target.value as 'load' | 'dig')} options={[{ value: 'load', label: 'Place plant or material beside an excavation' }, { value: 'dig', label: 'Dig: open or extend an excavation' }]} />
          <TextField label="What the work is" value={description} onChange={(e) => setDescription(e.target.value)} error={fields.description} />
          <div className="grid gap-3 sm:grid-cols-2">
            <TextField label="Window opens" type="datetime-local" value={start} onChange={(e) => setStart(e.target.value)} error={fields.windowStart} />
            <TextField label="Window closes" type="datetime-local" value={end} onChange={(e) => setEnd(e.target.value)} error={fields.windowEnd} />
          </div>
          <fieldset className="flex flex-col gap-1">
            <legend className="font-semibold">Excavations beside the work</legend>
            {excavations.data.filter((e) => e.state !== 'backfilled').map((e) => (
              <CheckboxField key={e.id} label={`${e.reference} ${e.name} (${e.depth.toFixed(2)} m deep)`} checked={ids.includes(e.id)} onChange={(ev) => setIds(ev.target.checked ? [...ids, e.id] : ids.filter((x) => x !== e.id))} />
            ))}
          </fieldset>
        </Panel>
        <div>
          <Button type="submit" busy={create.isPending} busyText="Creating…">Create and place the loads</Button>
        </div>
      </form>
    </Page>
  );
}
