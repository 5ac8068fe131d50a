import type { Migration } from 'kysely'
import * as m0001 from './0001_initial'
import * as m0002 from './0002_eclipse_settings'
import * as m0003 from './0003_planning'
import * as m0004 from './0004_climatology'
import * as m0005 from './0005_trips'
import * as m0006 from './0006_outbox'
import * as m0007 from './0007_filter_margins'
import * as m0008 from './0008_money'
import * as m0009 from './0009_session_version'
import * as m0010 from './0010_cluster'
import * as m0011 from './0011_briefing'
import * as m0012 from './0012_terrain'
import * as m0013 from './0013_account_tokens'
import * as m0014 from './0014_totp'
import * as m0015 from './0015_participants'
import * as m0016 from './0016_trip_ops'
import * as m0017 from './0017_alerts'
import * as m0018 from './0018_planning_details'
import * as m0019 from './0019_forecasts'
import * as m0020 from './0020_decisions'
import * as m0021 from './0021_personal_data'
import * as m0022 from './0022_seat_counter'
import * as m0023 from './0023_locale'
import * as m0024 from './0024_voyages'
import * as m0026 from './0026_outbox_locale'

/** Every migration, by name; names sort in the order they run. Bundled, so no file-system provider is needed. */
export const migrations: Record<string, Migration> = {
  '0001_initial': m0001,
  '0002_eclipse_settings': m0002,
  '0003_planning': m0003,
  '0004_climatology': m0004,
  '0005_trips': m0005,
  '0006_outbox': m0006,
  '0007_filter_margins': m0007,
  '0008_money': m0008,
  '0009_session_version': m0009,
  '0010_cluster': m0010,
  '0011_briefing': m0011,
  '0012_terrain': m0012,
  '0013_account_tokens': m0013,
  '0014_totp': m0014,
  '0015_participants': m0015,
  '0016_trip_ops': m0016,
  '0017_alerts': m0017,
  '0018_planning_details': m0018,
  '0019_forecasts': m0019,
  '0020_decisions': m0020,
  '0021_personal_data': m0021,
  '0022_seat_counter': m0022,
  '0023_locale': m0023,
  '0024_voyages': m0024,
  '0026_outbox_locale': m0026,
}
