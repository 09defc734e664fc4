import { peopleSearchMax } from '@shared/schemas/sites';
import { ShowMore } from '@client/components/Button';
import { TextField } from '@client/components/Fields';
import { Page, Panel } from '@client/components/Page';
import { LoadError, Loading } from '@client/components/Status';
import { ApiError } from '@client/lib/api';
import { useMe } from '@client/lib/session';
import { useUrlSearch } from '@client/lib/urlSearch';
import { usePeople } from '../api/people';
import { useSites } from '../api/sites';
import { InviteForm } from '../components/InviteForm';
import { OrganisationForm } from '../components/OrganisationForm';
import { PersonCard } from '../components/PersonCard';

export function PeoplePage() {
  const me = useMe();
  const { q, search, setSearch } = useUrlSearch();
  const people = usePeople(q);
  // A search the server refuses (too long, from a hand-made address) is told beside the box.
  const searchError = people.error instanceof ApiError ? people.error.fields.q : undefined;
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
        <form role="search" onSubmit={(e) => e.preventDefault()}>
          <TextField
            label="Search people"
            hint="A part of a name or e-mail address."
            type="search"
            maxLength={peopleSearchMax}
            value={search}
            error={searchError}
            onChange={(e) => setSearch(e.target.value)}
          />
        </form>
        {people.isPending ? <Loading what="Loading people" /> : null}
        {people.isError && !searchError ? <LoadError error={people.error} retry={() => people.refetch()} /> : null}
        {q && people.data?.length === 0 ? <p>Nobody’s name or e-mail address holds “{q}”.</p> : null}
        {people.data?.map((person) => (
          <PersonCard key={person.id} person={person} sites={siteList} isMe={person.id === me.data?.id} />
        ))}
        <ShowMore pages={people} label="Show more people" busyText="Loading more people…" />
      </section>
    </Page>
  );
}
