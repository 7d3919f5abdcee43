import { sql, type Kysely } from 'kysely';

/**
 * The first schema, covering the whole product: tenants and people, sites and their
 * equipment, gateways, measurement channels, raw readings and time buckets, pump runs, alerts,
 * notifications and the e-mail outbox, service visits, ingest rejects and the audit log.
 *
 * Units are SI throughout (volts, amps, metres, cubic metres, pascals, seconds, watts); the
 * column names carry the unit. The hot tables (readings, buckets) are keyed by site and carry
 * no foreign keys, so they can later be distributed by site.
 */
export async function up(db: Kysely<unknown>): Promise<void> {
  await sql`
create function is_valid_time_zone(tz text) returns boolean
  language sql stable as $$ select exists (select 1 from pg_timezone_names where name = tz) $$;

create table companies (
  id uuid primary key default gen_random_uuid(),
  name text not null check (length(btrim(name)) between 1 and 200),
  created_at timestamptz not null default now()
);

create table users (
  id uuid primary key default gen_random_uuid(),
  company_id uuid not null references companies(id) on delete cascade,
  email text not null check (email ~ '^[^@[:space:]]+@[^@[:space:]]+$' and length(email) <= 254),
  name text not null check (length(btrim(name)) between 1 and 200),
  role text not null check (role in ('admin', 'technician', 'owner')),
  password_hash text,
  active boolean not null default true,
  unit_system text not null default 'us' check (unit_system in ('us', 'metric')),
  time_zone text not null default 'UTC' check (is_valid_time_zone(time_zone)),
  quiet_hours_start time,
  quiet_hours_end time,
  failed_sign_ins integer not null default 0,
  locked_until timestamptz,
  last_sign_in_at timestamptz,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  check ((quiet_hours_start is null) = (quiet_hours_end is null))
);
create unique index users_email_key on users (lower(email));
create index users_company_idx on users (company_id);

create table sites (
  id uuid primary key default gen_random_uuid(),
  company_id uuid not null references companies(id) on delete cascade,
  name text not null check (length(btrim(name)) between 1 and 200),
  locality text not null default '',
  latitude double precision not null check (latitude between -90 and 90),
  longitude double precision not null check (longitude between -180 and 180),
  elevation_m double precision not null default 0 check (elevation_m between -500 and 9000),
  time_zone text not null check (is_valid_time_zone(time_zone)),
  notes text not null default '',
  reporting_interval_s integer not null default 30 check (reporting_interval_s between 1 and 86400),
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  unique (company_id, name)
);

create table owner_sites (
  user_id uuid not null references users(id) on delete cascade,
  site_id uuid not null references sites(id) on delete cascade,
  primary key (user_id, site_id)
);
create index owner_sites_site_idx on owner_sites (site_id);

create table invitations (
  id uuid primary key default gen_random_uuid(),
  company_id uuid not null references companies(id) on delete cascade,
  email text not null check (email ~ '^[^@[:space:]]+@[^@[:space:]]+$'),
  name text not null default '',
  role text not null check (role in ('admin', 'technician', 'owner')),
  site_ids uuid[] not null default '{}',
  token_hash text not null unique,
  invited_by uuid references users(id) on delete set null,
  expires_at timestamptz not null,
  used_at timestamptz,
  revoked_at timestamptz,
  created_at timestamptz not null default now()
);
create index invitations_company_idx on invitations (company_id, created_at desc);

create table password_resets (
  id uuid primary key default gen_random_uuid(),
  user_id uuid not null references users(id) on delete cascade,
  token_hash text not null unique,
  expires_at timestamptz not null,
  used_at timestamptz,
  created_at timestamptz not null default now()
);

create table refresh_tokens (
  id uuid primary key default gen_random_uuid(),
  user_id uuid not null references users(id) on delete cascade,
  token_hash text not null unique,
  expires_at timestamptz not null,
  revoked_at timestamptz,
  created_at timestamptz not null default now()
);
create index refresh_tokens_user_idx on refresh_tokens (user_id);

create table sign_in_attempts (
  id bigint generated always as identity primary key,
  email text not null,
  ip text not null,
  succeeded boolean not null,
  at timestamptz not null default now()
);
create index sign_in_attempts_email_idx on sign_in_attempts (lower(email), at desc);
create index sign_in_attempts_ip_idx on sign_in_attempts (ip, at desc);

-- Equipment ---------------------------------------------------------------------------

create table battery_banks (
  id uuid primary key default gen_random_uuid(),
  site_id uuid not null unique references sites(id) on delete cascade,
  name text not null default 'Battery bank',
  chemistry text not null check (chemistry in ('flooded', 'agm', 'gel', 'lifepo4')),
  nominal_voltage_v double precision not null check (nominal_voltage_v in (12, 24, 36, 48)),
  capacity_ah double precision not null check (capacity_ah > 0),
  strings integer not null default 1 check (strings between 1 and 16),
  installed_on date,
  notes text not null default '',
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now()
);

create table tanks (
  id uuid primary key default gen_random_uuid(),
  site_id uuid not null references sites(id) on delete cascade,
  key text not null check (key ~ '^[a-z0-9][a-z0-9_-]{0,31}$'),
  name text not null,
  kind text not null check (kind in ('storage', 'pressure')),
  geometry text check (geometry in ('vertical_cylinder', 'horizontal_cylinder', 'rectangular')),
  diameter_m double precision check (diameter_m > 0),
  length_m double precision check (length_m > 0),
  width_m double precision check (width_m > 0),
  height_m double precision check (height_m > 0),
  sensor_offset_m double precision not null default 0,
  capacity_m3 double precision check (capacity_m3 > 0),
  precharge_pa double precision check (precharge_pa > 0),
  cut_in_pa double precision check (cut_in_pa > 0),
  cut_out_pa double precision check (cut_out_pa > 0),
  notes text not null default '',
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  unique (site_id, key),
  check (kind <> 'storage' or (
    (geometry = 'vertical_cylinder' and diameter_m is not null and height_m is not null) or
    (geometry = 'horizontal_cylinder' and diameter_m is not null and length_m is not null) or
    (geometry = 'rectangular' and length_m is not null and width_m is not null and height_m is not null))),
  check (kind <> 'pressure' or (capacity_m3 is not null and precharge_pa is not null
    and cut_in_pa is not null and cut_out_pa is not null and cut_out_pa > cut_in_pa))
);

create table pumps (
  id uuid primary key default gen_random_uuid(),
  site_id uuid not null references sites(id) on delete cascade,
  key text not null check (key ~ '^[a-z0-9][a-z0-9_-]{0,31}$'),
  name text not null,
  kind text not null check (kind in ('well', 'booster', 'transfer')),
  supply text not null check (supply in ('battery', 'pv_direct')),
  rated_current_a double precision not null check (rated_current_a > 0),
  rated_flow_m3s double precision check (rated_flow_m3s > 0),
  motor_power_w double precision check (motor_power_w > 0),
  rebuild_interval_h double precision check (rebuild_interval_h > 0),
  last_rebuild_at timestamptz,
  fills_tank_id uuid references tanks(id) on delete set null,
  draws_from_tank_id uuid references tanks(id) on delete set null,
  notes text not null default '',
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  unique (site_id, key)
);

create table pv_arrays (
  id uuid primary key default gen_random_uuid(),
  site_id uuid not null references sites(id) on delete cascade,
  key text not null check (key ~ '^[a-z0-9][a-z0-9_-]{0,31}$'),
  name text not null,
  rated_w double precision not null check (rated_w > 0),
  purpose text not null check (purpose in ('battery_charging', 'pump_direct')),
  pump_id uuid references pumps(id) on delete set null,
  tilt_deg double precision not null default 30 check (tilt_deg between 0 and 90),
  azimuth_deg double precision not null default 180 check (azimuth_deg >= 0 and azimuth_deg < 360),
  notes text not null default '',
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  unique (site_id, key)
);

create table float_switches (
  id uuid primary key default gen_random_uuid(),
  site_id uuid not null references sites(id) on delete cascade,
  key text not null check (key ~ '^[a-z0-9][a-z0-9_-]{0,31}$'),
  name text not null,
  tank_id uuid not null references tanks(id) on delete cascade,
  pump_id uuid references pumps(id) on delete set null,
  logic text not null check (logic in ('closes_on_low', 'opens_on_high')),
  notes text not null default '',
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  unique (site_id, key)
);

create table wells (
  id uuid primary key default gen_random_uuid(),
  site_id uuid not null unique references sites(id) on delete cascade,
  depth_m double precision not null check (depth_m > 0),
  casing_diameter_m double precision not null check (casing_diameter_m > 0),
  static_level_m double precision check (static_level_m >= 0),
  pump_setting_m double precision check (pump_setting_m > 0),
  notes text not null default '',
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now(),
  check (static_level_m is null or static_level_m < depth_m),
  check (pump_setting_m is null or pump_setting_m < depth_m)
);

-- Gateways and telemetry --------------------------------------------------------------

create table gateways (
  id text primary key check (id ~ '^[a-z0-9][a-z0-9-]{2,63}$'),
  site_id uuid not null references sites(id) on delete cascade,
  name text not null default '',
  secret_hash text not null,
  created_at timestamptz not null default now(),
  rotated_at timestamptz,
  revoked_at timestamptz,
  last_seen_at timestamptz,
  online boolean not null default false,
  status_changed_at timestamptz
);
create index gateways_site_idx on gateways (site_id);

create table channels (
  id integer generated always as identity primary key,
  site_id uuid not null references sites(id) on delete cascade,
  name text not null check (length(name) between 1 and 128),
  unit text not null,
  value_kind text not null check (value_kind in ('number', 'boolean', 'string')),
  created_at timestamptz not null default now(),
  last_time timestamptz,
  last_value double precision,
  last_text text,
  unique (site_id, name)
);

-- Raw readings: one row per record, partitioned by day so retention drops whole partitions.
-- Booleans are stored as 0/1 in value; string values (controller stage) in text_value.
create table readings (
  site_id uuid not null,
  channel_id integer not null,
  time timestamptz not null,
  value double precision,
  text_value text,
  received_at timestamptz not null default now(),
  primary key (site_id, channel_id, time)
) partition by range (time);

-- Time buckets. Switch channels also carry on-seconds and starts (off->on transitions).
create table minute_buckets (
  site_id uuid not null,
  channel_id integer not null,
  bucket_start timestamptz not null,
  sample_count integer not null check (sample_count > 0),
  sum double precision not null,
  min double precision not null,
  max double precision not null,
  first_value double precision not null,
  first_time timestamptz not null,
  last_value double precision not null,
  last_time timestamptz not null,
  on_seconds double precision,
  starts integer,
  primary key (site_id, channel_id, bucket_start)
) partition by range (bucket_start);

create table hour_buckets (like minute_buckets including all);
create table day_buckets (like minute_buckets including all);

/*
 * Creates the missing range partitions of a time-partitioned table between two instants.
 * Partitions are named <table>_pYYYYMMDD after their first day; step is '1 day' or '1 month'.
 */
create function ensure_time_partitions(parent text, step interval, from_ts timestamptz, to_ts timestamptz)
returns integer language plpgsql as $$
declare
  unit text := case when step = interval '1 month' then 'month' else 'day' end;
  lo timestamptz := date_trunc(unit, from_ts at time zone 'UTC') at time zone 'UTC';
  hi timestamptz;
  name text;
  created integer := 0;
begin
  while lo < to_ts loop
    hi := ((lo at time zone 'UTC') + step) at time zone 'UTC';
    name := parent || '_p' || to_char(lo at time zone 'UTC', 'YYYYMMDD');
    if to_regclass(name) is null then
      execute format('create table if not exists %I partition of %I for values from (%L) to (%L)',
                     name, parent, lo, hi);
      created := created + 1;
    end if;
    lo := hi;
  end loop;
  return created;
end $$;

create table pump_runs (
  id bigint generated always as identity primary key,
  site_id uuid not null,
  pump_id uuid not null references pumps(id) on delete cascade,
  started_at timestamptz not null,
  ended_at timestamptz,
  duration_s double precision check (duration_s >= 0),
  energy_wh double precision check (energy_wh >= 0),
  mean_current_a double precision,
  water_m3 double precision,
  water_source text check (water_source in ('tank_rise', 'flow')),
  spans_gap boolean not null default false,
  updated_at timestamptz not null default now(),
  unique (pump_id, started_at),
  check (ended_at is null or ended_at >= started_at)
);
create index pump_runs_site_time_idx on pump_runs (site_id, started_at desc);

create table ingest_rejects (
  id bigint generated always as identity primary key,
  gateway_id text not null,
  site_id uuid,
  received_at timestamptz not null default now(),
  record_name text,
  record_time timestamptz,
  reason text not null,
  raw text
);
create index ingest_rejects_gateway_idx on ingest_rejects (gateway_id, received_at desc);
create index ingest_rejects_site_idx on ingest_rejects (site_id, received_at desc);

-- Alerts --------------------------------------------------------------------------------

create table alert_settings (
  site_id uuid not null references sites(id) on delete cascade,
  kind text not null check (kind in ('low_charge', 'overnight_sag', 'float_stuck', 'dry_run',
                                     'short_cycling', 'gateway_silent', 'water_low', 'no_charge')),
  enabled boolean not null default true,
  params jsonb not null default '{}' check (jsonb_typeof(params) = 'object'),
  updated_at timestamptz not null default now(),
  updated_by uuid references users(id) on delete set null,
  primary key (site_id, kind)
);

create table alerts (
  id uuid primary key default gen_random_uuid(),
  site_id uuid not null references sites(id) on delete cascade,
  kind text not null check (kind in ('low_charge', 'overnight_sag', 'float_stuck', 'dry_run',
                                     'short_cycling', 'gateway_silent', 'water_low', 'no_charge')),
  subject text not null default '',
  severity text not null check (severity in ('watch', 'act')),
  status text not null check (status in ('open', 'acknowledged', 'cleared')),
  summary text not null default '',
  evidence jsonb not null default '{}',
  opened_at timestamptz not null default now(),
  acknowledged_at timestamptz,
  acknowledged_by uuid references users(id) on delete set null,
  acknowledge_note text,
  cleared_at timestamptz,
  cleared_by uuid references users(id) on delete set null,
  clear_note text,
  reopened_count integer not null default 0,
  updated_at timestamptz not null default now()
);
-- One open (or acknowledged) alert per kind per site and piece of equipment.
create unique index alerts_one_open_idx on alerts (site_id, kind, subject) where status <> 'cleared';
create index alerts_site_time_idx on alerts (site_id, opened_at desc);

create table alert_events (
  id bigint generated always as identity primary key,
  alert_id uuid not null references alerts(id) on delete cascade,
  site_id uuid not null,
  event text not null check (event in ('opened', 'acknowledged', 'cleared', 'reopened')),
  at timestamptz not null default now(),
  user_id uuid references users(id) on delete set null,
  note text,
  evidence jsonb
);
create index alert_events_alert_idx on alert_events (alert_id, at);
create index alert_events_site_idx on alert_events (site_id, at desc);

create table notification_preferences (
  user_id uuid primary key references users(id) on delete cascade,
  kinds text[] not null default '{low_charge,overnight_sag,float_stuck,dry_run,short_cycling,gateway_silent,water_low,no_charge}',
  site_ids uuid[],
  on_open boolean not null default true,
  on_clear boolean not null default true,
  updated_at timestamptz not null default now()
);

-- A message is written here before it is sent, and marked sent once (see the rules module).
create table email_outbox (
  id bigint generated always as identity primary key,
  dedupe_key text not null unique,
  user_id uuid references users(id) on delete set null,
  to_address text not null,
  subject text not null,
  text_body text not null,
  html_body text,
  category text not null check (category in ('alert', 'summary', 'invitation', 'password_reset')),
  alert_event_id bigint references alert_events(id) on delete set null,
  hold_until timestamptz,
  attempts integer not null default 0,
  next_attempt_at timestamptz not null default now(),
  sent_at timestamptz,
  message_id text,
  last_error text,
  created_at timestamptz not null default now()
);
create index email_outbox_pending_idx on email_outbox (next_attempt_at) where sent_at is null;

-- Service visits ------------------------------------------------------------------------

create table service_visits (
  id uuid primary key default gen_random_uuid(),
  site_id uuid not null references sites(id) on delete cascade,
  visited_at timestamptz not null,
  technician_id uuid references users(id) on delete set null,
  summary text not null check (length(btrim(summary)) between 1 and 500),
  findings text not null default '',
  parts_replaced text not null default '',
  created_by uuid references users(id) on delete set null,
  created_at timestamptz not null default now(),
  updated_at timestamptz not null default now()
);
create index service_visits_site_idx on service_visits (site_id, visited_at desc);

create table attachments (
  id uuid primary key default gen_random_uuid(),
  visit_id uuid not null references service_visits(id) on delete cascade,
  site_id uuid not null references sites(id) on delete cascade,
  file_name text not null,
  content_type text not null check (content_type in ('image/jpeg', 'image/png', 'image/webp', 'application/pdf')),
  size_bytes bigint not null check (size_bytes > 0),
  sha256 text not null,
  storage_key text not null,
  thumbnail_key text,
  uploaded_by uuid references users(id) on delete set null,
  created_at timestamptz not null default now()
);
create index attachments_visit_idx on attachments (visit_id);

create table audit_log (
  id bigint generated always as identity primary key,
  company_id uuid references companies(id) on delete cascade,
  user_id uuid references users(id) on delete set null,
  at timestamptz not null default now(),
  action text not null,
  target_type text,
  target_id text,
  details jsonb not null default '{}',
  ip text
);
create index audit_log_company_idx on audit_log (company_id, at desc);
`.execute(db);
}

export async function down(db: Kysely<unknown>): Promise<void> {
  await sql`
drop table if exists audit_log, attachments, service_visits, email_outbox, notification_preferences,
  alert_events, alerts, alert_settings, ingest_rejects, pump_runs, day_buckets, hour_buckets,
  minute_buckets, readings, channels, gateways, wells, float_switches, pv_arrays, pumps, tanks,
  battery_banks, sign_in_attempts, refresh_tokens, password_resets, invitations, owner_sites, sites,
  users, companies cascade;
drop function if exists ensure_time_partitions(text, interval, timestamptz, timestamptz);
drop function if exists is_valid_time_zone(text);
`.execute(db);
}
