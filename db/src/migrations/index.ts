import type { Migration } from 'kysely';
import * as init from './20261202_0400_init.js';
import * as ingestRollups from './20261202_0510_ingest_rollups.js';
import * as alertNotifications from './20261202_0700_alert_notifications.js';
import * as fastTimeZoneCheck from './20261202_1100_fast_time_zone_check.js';
import * as sixHourBuckets from './20261202_1130_six_hour_buckets.js';
import * as mailWaitingForServer from './20261202_1400_mail_waiting_for_server.js';
import * as coveringBucketKeys from './20261202_1410_covering_bucket_keys.js';
import * as tenMinuteBuckets from './20261202_1500_ten_minute_buckets.js';
import * as readingsTimeIndex from './20261202_1510_readings_time_index.js';
import * as roomToUpdateInPlace from './20261203_1550_room_to_update_in_place.js';
import * as openPumpRunCarry from './20261203_1800_open_pump_run_carry.js';

/**
 * Every migration, by name. Names start with a timestamp so they sort in the order they run;
 * add a file and one line here (see DEVELOPERS.md, "Adding a migration").
 */
export const migrations: Record<string, Migration> = {
  '20261202_0400_init': init,
  '20261202_0510_ingest_rollups': ingestRollups,
  '20261202_0700_alert_notifications': alertNotifications,
  '20261202_1100_fast_time_zone_check': fastTimeZoneCheck,
  '20261202_1130_six_hour_buckets': sixHourBuckets,
  '20261202_1400_mail_waiting_for_server': mailWaitingForServer,
  '20261202_1410_covering_bucket_keys': coveringBucketKeys,
  '20261202_1500_ten_minute_buckets': tenMinuteBuckets,
  '20261202_1510_readings_time_index': readingsTimeIndex,
  '20261203_1550_room_to_update_in_place': roomToUpdateInPlace,
  '20261203_1800_open_pump_run_carry': openPumpRunCarry,
};
