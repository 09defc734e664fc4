import { useState } from 'react';
import type { DefaultValues } from 'react-hook-form';
import {
  elementLoad,
  G,
  plantCategories,
  plantCategoryLabels,
  plantElementKindLabels,
  type PlantItem,
  type PlantItemInput,
} from '@shared/schemas/plant';
import { Button } from '@client/components/Button';
import { Caution } from '@client/components/Caution';
import { ConfirmAction } from '@client/components/ConfirmAction';
import { Page, Panel } from '@client/components/Page';
import { LoadError, Loading, Notice } from '@client/components/Status';
import { errorMessage } from '@client/lib/api';
import { useMe } from '@client/lib/session';
import { useFigures } from '@client/lib/units';
import { useDeletePlant, usePlant, useSavePlant } from '../api/plant';
import { Footprint } from '../components/Footprint';
import { PlantForm } from '../components/PlantForm';
import { StockpileHelper } from '../components/StockpileHelper';

/** A new machine: the operating mass starts empty (the form asks for it). */
const blank: DefaultValues<PlantItemInput> = {
  name: '',
  category: 'excavator',
  designFactor: 1,
  notes: '',
  elements: [
    { name: 'Left track', kind: 'track', x: 0, y: 1, length: 3, width: 0.6, share: 0.5 },
    { name: 'Right track', kind: 'track', x: 0, y: -1, length: 3, width: 0.6, share: 0.5 },
  ],
};

const inputOf = (p: PlantItem): PlantItemInput => ({
  name: p.name,
  category: p.category,
  operatingMass: p.operatingMass,
  designFactor: p.designFactor,
  notes: p.notes,
  elements: p.elements,
});

/** The plant library: every machine with its bearing elements drawn to scale and what each carries. */
export function PlantPage() {
  const me = useMe().data;
  const plant = usePlant();
  const save = useSavePlant();
  const del = useDeletePlant();
  const [editing, setEditing] = useState<PlantItem | 'new' | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const canEdit = Boolean(me?.isAdmin || me?.memberships.some((m) => m.role === 'coordinator'));

  if (plant.isPending) return <Loading what="Loading the plant library" />;
  if (plant.isError) return <LoadError error={plant.error} retry={() => plant.refetch()} />;

  return (
    <Page
      title="Plant library"
      intro="Machines and what they stand on: tracks, outrigger pads, wheels. Permits place these beside excavations; their pressures below include each machine's design factor."
      actions={
        canEdit && editing === null ? (
          <Button onClick={() => setEditing('new')} variant="secondary">
            Add a machine
          </Button>
        ) : null
      }
    >
      <Notice>{notice}</Notice>
      <Caution />
      {editing !== null ? (
        <Panel title={editing === 'new' ? 'New machine' : `Change ${editing.name}`}>
          <PlantForm
            initial={editing === 'new' ? blank : inputOf(editing)}
            saveLabel={editing === 'new' ? 'Add to the library' : 'Save changes'}
            onCancel={() => setEditing(null)}
            onSave={async (values) => {
              const item = await save.mutateAsync({
                id: editing === 'new' ? null : editing.id,
                version: editing === 'new' ? 0 : editing.version,
                values,
              });
              setEditing(null);
              setNotice(`${item.name} saved.`);
            }}
          />
        </Panel>
      ) : null}
      <StockpileHelper />
      <div className="grid gap-6 xl:grid-cols-2">
        {[...plant.data]
          .sort((a, b) => plantCategories.indexOf(a.category) - plantCategories.indexOf(b.category) || a.operatingMass - b.operatingMass)
          .map((p) => (
            <Panel
              key={p.id}
              title={p.name}
              actions={
                canEdit && editing === null ? (
                  <div className="flex flex-wrap gap-2">
                    <Button variant="secondary" onClick={() => setEditing(p)} aria-label={`Change ${p.name}`}>
                      Change
                    </Button>
                    <ConfirmAction
                      label="Remove"
                      ariaLabel={`Remove ${p.name}`}
                      question={`Remove ${p.name} from the plant library? Permits that already name it keep their own copy of its figures.`}
                      confirmLabel="Remove it"
                      onConfirm={async () => {
                        try {
                          await del.mutateAsync(p.id);
                          setNotice(`${p.name} removed.`);
                        } catch (e) {
                          setNotice(errorMessage(e));
                        }
                      }}
                    />
                  </div>
                ) : null
              }
            >
              <PlantSummary item={p} />
            </Panel>
          ))}
      </div>
    </Page>
  );
}

function PlantSummary({ item }: { item: PlantItem }) {
  const figures = useFigures();
  return (
    <>
      <p>
        {plantCategoryLabels[item.category]} · operating mass <strong>{figures.mass(item.operatingMass)}</strong> (
        {figures.force(item.operatingMass * G)}) · design factor {item.designFactor.toFixed(2)}
      </p>
      <Footprint elements={item.elements} name={item.name} figures={figures} />
      <div className="overflow-x-auto">
        <table className="text-sm">
          <thead>
            <tr className="border-b border-rule-strong">
              <th scope="col" className="pr-3 text-left">
                #
              </th>
              <th scope="col" className="pr-3 text-left">
                Element
              </th>
              <th scope="col" className="pr-3 text-right">
                Size ({figures.unit('length')})
              </th>
              <th scope="col" className="pr-3 text-right">
                Share
              </th>
              <th scope="col" className="pr-3 text-right">
                Load ({figures.unit('force')})
              </th>
              <th scope="col" className="text-right">
                Pressure ({figures.unit('pressure')})
              </th>
            </tr>
          </thead>
          <tbody>
            {item.elements.map((e, i) => {
              const { force, pressure } = elementLoad(item, e);
              return (
                <tr key={`${e.name}-${i}`} className="border-b border-rule last:border-0">
                  <td className="pr-3">{i + 1}</td>
                  <td className="pr-3">
                    {e.name} <span className="text-ink-soft">({plantElementKindLabels[e.kind].toLowerCase()})</span>
                  </td>
                  <td className="pr-3 text-right tabular-nums">
                    {figures.length(e.length, { bare: true })} × {figures.length(e.width, { bare: true })}
                  </td>
                  <td className="pr-3 text-right tabular-nums">{(e.share * 100).toFixed(1)} %</td>
                  <td className="pr-3 text-right tabular-nums">{figures.force(force, { bare: true })}</td>
                  <td className="text-right tabular-nums">{figures.pressure(pressure, { bare: true })}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {item.notes ? <p className="text-sm text-ink-soft">{item.notes}</p> : null}
    </>
  );
}
