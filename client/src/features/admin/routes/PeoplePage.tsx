import { ShowMore } from '@client/components/Button';
import { Page, Panel } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { useMe } from '@client/lib/session';
import { usePeople } from '../api/people';
import { useSites } from '../api/sites';
import { InviteForm } from '../components/InviteForm';
import { OrganisationForm } from '../components/OrganisationForm';
import { PersonCard } from '../components/PersonCard';

export function PeoplePage() {
  const me = useMe();
  const people = usePeople();
  const sites = useSites();
  const siteList = sites.data ?? [];

  return (
    <Page title="People" intro="Invite people, give them a role on each site, and deactivate those who leave.">
      {me.data ? (
        <Panel title="Your organisation">
          <OrganisationForm organisation={me.data.organisation} />
        </Panel>
      ) : null}
      <Panel title="Invite a person">
        {sites.isError ? <LoadError error={sites.error} retry={() => sites.refetch()} /> : <InviteForm sites={siteList} />}
      </Panel>
      <section aria-labelledby="people-list" className="flex flex-col gap-4">
        <h2 id="people-list" className="text-xl font-bold">
          Everyone in {me.data?.organisation.name ?? 'your organisation'}
        </h2>
        {people.isPending ? <Loading what="Loading people" /> : null}
        {people.isError ? <LoadError error={people.error} retry={() => people.refetch()} /> : null}
        {people.data?.map((person) => (
          <PersonCard key={person.id} person={person} sites={siteList} isMe={person.id === me.data?.id} />
        ))}
        <ShowMore pages={people} label="Show more people" busyText="Loading more people…" />
      </section>
    </Page>
  );
}
