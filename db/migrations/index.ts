import type { Migration } from 'kysely';
import * as m0001 from './0001_foundation';
import * as m0002 from './0002_excavations_plant_uploads';
import * as m0004 from './0004_permits';
import * as m0005 from './0005_inspections';
import * as m0006 from './0006_field';
import * as m0007 from './0007_stored_shapes';
import * as m0008 from './0008_outbox';
import * as m0009 from './0009_revision_snapshots';
import * as m0010 from './0010_push';
import * as m0011 from './0011_attempt_counts';
import * as m0012 from './0012_units';
import * as m0013 from './0013_list_indexes';
import * as m0014 from './0014_organisations';
import * as m0015 from './0015_excavation_answers';
import * as m0016 from './0016_page_indexes';
import * as m0017 from './0017_organisation_bounds';
import * as m0018 from './0018_people_search';
import * as m0019 from './0019_review_index';
import * as m0020 from './0020_list_verdict';

/**
 * Every migration, in order. Listed here (not read from the folder) so that the same code runs
 * under tsx, vitest and a bundler. A new migration: a new file `NNNN_name.ts` and a line below.
 */
export const migrations: Record<string, Migration> = {
  '0001_foundation': m0001,
  '0002_excavations_plant_uploads': m0002,
  '0004_permits': m0004,
  '0005_inspections': m0005,
  '0006_field': m0006,
  '0007_stored_shapes': m0007,
  '0008_outbox': m0008,
  '0009_revision_snapshots': m0009,
  '0010_push': m0010,
  '0011_attempt_counts': m0011,
  '0012_units': m0012,
  '0013_list_indexes': m0013,
  '0014_organisations': m0014,
  '0015_excavation_answers': m0015,
  '0016_page_indexes': m0016,
  '0017_organisation_bounds': m0017,
  '0018_people_search': m0018,
  '0019_review_index': m0019,
  '0020_list_verdict': m0020,
};
