import { sql, type Kysely } from 'kysely';

// Issue 16 §1: the database itself keeps organisations apart where the server's checks
// (server/src/services/organisation.ts) are the only guard otherwise:
// - a site member is a person of the site's organisation (site_members);
// - a permit's loads place only machines of its site's organisation (permit_revisions.loads, jsonb);
// - a person, a site or a machine does not change organisation under such a row.
// Each refusal is a check violation (SQLSTATE 23514) naming its rule as the constraint.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`
    create function refuse_other_organisation(rule text, detail text) returns void language plpgsql as $$
    begin
      raise exception 'refused by %: %', rule, detail using errcode = 'check_violation', constraint = rule;
    end $$`.execute(db);

  await sql`
    create function site_member_same_organisation() returns trigger language plpgsql as $$
    begin
      if (select organisation_id from users where id = new.user_id)
         is distinct from (select organisation_id from sites where id = new.site_id) then
        perform refuse_other_organisation('site_member_same_organisation',
          format('person %s is not of the organisation of site %s', new.user_id, new.site_id));
      end if;
      return new;
    end $$`.execute(db);
  await sql`create trigger site_member_same_organisation before insert or update on site_members
    for each row execute function site_member_same_organisation()`.execute(db);

  // The loads' machines (plantItemId; a load without one names none) and the permit's site.
  await sql`
    create function permit_loads_own_machines() returns trigger language plpgsql as $$
    declare bad integer;
    begin
      select (l->>'plantItemId')::int into bad
      from jsonb_array_elements(case when jsonb_typeof(new.loads) = 'array' then new.loads else '[]'::jsonb end) l
      join plant_items m on m.id = (l->>'plantItemId')::int
      join permits p on p.id = new.permit_id
      join sites s on s.id = p.site_id
      where jsonb_typeof(l->'plantItemId') = 'number' and m.organisation_id <> s.organisation_id
      limit 1;
      if bad is not null then
        perform refuse_other_organisation('permit_loads_own_machines',
          format('machine %s is not of the organisation of permit %s''s site', bad, new.permit_id));
      end if;
      return new;
    end $$`.execute(db);
  await sql`create trigger permit_loads_own_machines before insert or update of loads, permit_id on permit_revisions
    for each row execute function permit_loads_own_machines()`.execute(db);

  // A move to another organisation that would leave such a row behind.
  await sql`
    create function organisation_kept() returns trigger language plpgsql as $$
    begin
      if new.organisation_id is distinct from old.organisation_id and (
        (tg_table_name = 'users' and exists (select 1 from site_members where user_id = new.id))
        or (tg_table_name = 'sites' and (exists (select 1 from site_members where site_id = new.id)
                                          or exists (select 1 from permits where site_id = new.id)))
        or (tg_table_name = 'plant_items' and exists (select 1 from permit_revisions
              where loads @> jsonb_build_array(jsonb_build_object('plantItemId', new.id))))
      ) then
        perform refuse_other_organisation('organisation_kept',
          format('%s %s has rows of its organisation', tg_table_name, new.id));
      end if;
      return new;
    end $$`.execute(db);
  for (const table of ['users', 'sites', 'plant_items'])
    await sql`create trigger organisation_kept before update of organisation_id on ${sql.table(table)}
      for each row execute function organisation_kept()`.execute(db);
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const table of ['users', 'sites', 'plant_items']) await sql`drop trigger organisation_kept on ${sql.table(table)}`.execute(db);
  await sql`drop trigger permit_loads_own_machines on permit_revisions`.execute(db);
  await sql`drop trigger site_member_same_organisation on site_members`.execute(db);
  await sql`drop function organisation_kept(), permit_loads_own_machines(), site_member_same_organisation(), refuse_other_organisation(text, text)`.execute(
    db,
  );
}
