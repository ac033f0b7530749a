/*
 * Row types of the tables, registered with knex so `db("users")` is typed everywhere.
 * Later migrations add their tables here (or in a `tables.ts` of their own under lib/db).
 */
import type { Knex } from "knex";
import type { Tables } from "knex/types/tables";
import type { Role } from "@/lib/auth/roles";

export type UserRow = {
  id: string;
  email: string;
  display_name: string;
  password_hash: string;
  created_at: Date;
};

export type UserSessionRow = { id: string; user_id: string; expires_at: Date };

export type ResearchGroupRow = { id: number; name: string; created_at: Date };

export type MembershipRow = { user_id: string; group_id: number; role: Role; created_at: Date };

export type SiteRow = {
  id: number;
  group_id: number;
  name: string;
  latitude: number;
  longitude: number;
  elevation_m: number;
  measurement_height_m: number;
  canopy_height_m: number;
  displacement_height_m: number | null;
  utc_offset_hours: number;
  notes: string | null;
  /** the rule set whose labels the site shows (migration 20261203000200) */
  active_rule_set_id: number | null;
  created_at: Date;
  updated_at: Date;
};

export type AuditLogRow = {
  id: number;
  group_id: number | null;
  user_id: string | null;
  action: string;
  entity_type: string;
  entity_id: string;
  /** JSON text on write; mysql2 parses JSON columns on read */
  detail: unknown;
  created_at: Date;
};

export type SignInAttemptRow = {
  id: number;
  email: string;
  ip: string;
  succeeded: boolean | 0 | 1;
  created_at: Date;
};

/*
 * Tables of the data model (issue 4 onwards). JSON columns are `unknown`: mysql2 may hand them
 * back parsed or as text, so read them with jsonColumn() (lib/db/json.ts) and write
 * JSON.stringify(...). BIGINT counters that may exceed 2^53 come back as strings.
 */

export type EveningLabel = "local" | "stagnant" | "advective" | "unclassified";

export type RuleSetRow = {
  id: number;
  group_id: number;
  version: number;
  name: string;
  definition: unknown;
  author_id: string | null;
  comment: string | null;
  created_at: Date;
};

export type JobRow = {
  id: number;
  kind: string;
  group_id: number;
  site_id: number | null;
  payload: unknown;
  status: "queued" | "running" | "done" | "failed" | "cancelled";
  phase: string;
  progress_done: number | string;
  progress_total: number | string;
  progress_unit: "rows" | "bytes" | "evenings";
  message: string | null;
  result: unknown;
  attempts: number;
  locked_by: string | null;
  heartbeat_at: Date | null;
  created_by: string | null;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
};

export type ImportStatus =
  "pending" | "queued" | "running" | "landed" | "failed" | "refused" | "deleted" | "purged";

export type ImportTableRow = {
  id: number;
  site_id: number;
  sha256: string;
  original_name: string;
  size_bytes: number;
  storage_key: string;
  mapping: unknown;
  options: unknown;
  status: ImportStatus;
  job_id: number | null;
  overlap_choice: "cancel" | "replace" | "keep" | null;
  first_start_utc: Date | null;
  last_start_utc: Date | null;
  rows_written: number;
  report: unknown;
  created_by: string | null;
  created_at: Date;
  finished_at: Date | null;
};

export type SiteSeriesRow = {
  site_id: number;
  slot: number;
  name: string;
  unit: string;
  kind: "concentration" | "flux";
};

/** One averaging period of one site; NULL = missing. Units of lib/series/types.ts. */
export type HalfHourRow = {
  site_id: number;
  start_utc: Date;
  import_id: number | null;
  ws: number | null;
  wd: number | null;
  ustar: number | null;
  w_sigma: number | null;
  h: number | null;
  le: number | null;
  ta: number | null;
  pa: number | null;
  rh: number | null;
  vpd: number | null;
  zl: number | null;
  mo_length: number | null;
  fc: number | null;
  co2: number | null;
  sw_in: number | null;
  tracer_1: number | null;
  tracer_2: number | null;
  tracer_3: number | null;
  tracer_4: number | null;
  tracer_5: number | null;
  tracer_6: number | null;
  tracer_7: number | null;
  tracer_8: number | null;
};

/**
 * Summary of one site's stored half_hours for the site list, kept true by the import write
 * (features/imports/server/write.ts) in the transaction that writes or deletes the rows.
 */
export type SiteCoverageRow = {
  site_id: number;
  /** rows stored, values or not */
  stored_half_hours: number;
  /** rows with at least one value */
  present_half_hours: number;
  first_start_utc: Date | null;
  last_start_utc: Date | null;
};

export type EveningRow = {
  id: number;
  site_id: number;
  /**
   * DATE on the data clock: mysql2 reads it as a Date at midnight UTC; queries compare it with
   * "YYYY-MM-DD" text, so both are allowed.
   */
  local_date: Date | string;
  sunset_utc: Date | null;
  civil_dusk_utc: Date | null;
  auto_label: EveningLabel;
  rule: string | null;
  reasons: unknown;
  margins: unknown;
  metrics: unknown;
  sigma_w_evening: number | null;
  ws_evening: number | null;
  rule_set_id: number | null;
  rule_set_version: number | null;
  computed_at: Date;
  final_label: EveningLabel;
  label_source: "auto" | "override";
  override_note: string | null;
  reviewed: boolean | 0 | 1;
  reviewed_by: string | null;
  reviewed_at: Date | null;
  version: number;
};

export type EveningEventRow = {
  id: number;
  evening_id: number;
  kind: "auto" | "override" | "revert" | "reviewed";
  from_label: EveningLabel | null;
  to_label: EveningLabel | null;
  note: string | null;
  user_id: string | null;
  rule_set_version: number | null;
  created_at: Date;
};

export type ApiTokenRow = {
  id: number;
  user_id: string;
  name: string;
  token_hash: string;
  last_used_at: Date | null;
  created_at: Date;
  revoked_at: Date | null;
};

export type ImportTemplateRow = {
  site_id: number;
  template: unknown;
  updated_by: string | null;
  updated_at: Date;
};

export type MailOutboxRow = {
  id: number;
  dedupe_key: string | null;
  kind: string;
  to_address: string;
  subject: string;
  text_body: string;
  html_body: string | null;
  status: "pending" | "sending" | "sent" | "failed";
  attempts: number;
  next_attempt_at: Date;
  lease_owner: string | null;
  lease_until: Date | null;
  last_error: string | null;
  message_id: string | null;
  delivered_id: string | null;
  sent_at: Date | null;
  created_at: Date;
};

export type InvitationRow = {
  id: number;
  group_id: number;
  email: string;
  role: Role;
  token_hash: string;
  invited_by: string | null;
  expires_at: Date;
  sent_at: Date;
  accepted_at: Date | null;
  accepted_by: string | null;
  revoked_at: Date | null;
  created_at: Date;
};

export type PasswordResetRow = {
  id: number;
  user_id: string;
  token_hash: string;
  expires_at: Date;
  used_at: Date | null;
  created_at: Date;
};

export type NotificationPreferencesRow = {
  user_id: string;
  import_notices: boolean | 0 | 1;
  weekly_digest: boolean | 0 | 1;
  updated_at: Date;
};

export type AnomalyKind = "rise-after-sunset" | "rise-before-sunset" | "drop" | "spike";

export type AnomalyRow = {
  id: number;
  site_id: number;
  evening_id: number;
  series: string;
  kind: AnomalyKind;
  start_utc: Date;
  end_utc: Date;
  peak_score: number;
  peak_value: number | null;
  baseline_value: number | null;
  periods: number;
  label_at_detection: EveningLabel | null;
  rule_set_version: number | null;
  detected_at: Date;
};

export type UstarThresholdRow = {
  id: number;
  site_id: number;
  season_year: number;
  season: "winter" | "spring" | "summer" | "autumn" | "year";
  flux_series: string;
  threshold_ms: number | null;
  points: number;
  temperature_classes_used: number;
  bootstrap_resamples: number;
  bootstrap_found: number;
  p05_ms: number | null;
  p50_ms: number | null;
  p95_ms: number | null;
  sd_ms: number | null;
  computed_at: Date;
};

export type WeakTurbulenceRow = {
  evening_id: number;
  site_id: number;
  flux_series: string;
  threshold_ms: number;
  night_periods: number;
  weak_periods: number;
  first_weak_utc: Date | null;
  last_weak_utc: Date | null;
  computed_at: Date;
};

/*
 * What a column accepts on write: its read type or raw SQL (db.fn.now(), db.raw(...)); a
 * DATETIME/DATE also takes MariaDB text ("2024-03-01 00:30:00"), a flag also 0/1.
 */
type WriteValue<V> = V | Knex.Raw | (V extends Date ? string : never) | (V extends boolean ? number : never);
type Writable<T> = { [K in keyof T]: WriteValue<T[K]> };

/** Columns filled by the database (auto ids, defaults, nullable ones) are optional on insert. */
type Table<Row, Generated extends keyof Row> = Knex.CompositeTableType<
  Row,
  Writable<Omit<Row, Generated> & Partial<Pick<Row, Generated>>>,
  Partial<Writable<Omit<Row, "id">>>
>;

/** What `db(table).insert(...)` accepts for one row of a registered table. */
export type InsertRow<T extends keyof Tables> = Knex.ResolveTableType<Tables[T], "insert">;

/** Keys of Row whose value may be null: nullable columns may be left out of an insert. */
type NullableKeys<Row> = { [K in keyof Row]-?: null extends Row[K] ? K : never }[keyof Row];

declare module "knex/types/tables" {
  interface Tables {
    users: Table<UserRow, "created_at">;
    user_sessions: Table<UserSessionRow, never>;
    research_groups: Table<ResearchGroupRow, "id" | "created_at">;
    memberships: Table<MembershipRow, "created_at">;
    sites: Table<
      SiteRow,
      "id" | "created_at" | "updated_at" | "notes" | "displacement_height_m" | "active_rule_set_id"
    >;
    audit_log: Table<AuditLogRow, "id" | "created_at" | "detail">;
    sign_in_attempts: Table<SignInAttemptRow, "id" | "created_at">;
    rule_sets: Table<RuleSetRow, "id" | "created_at" | NullableKeys<RuleSetRow>>;
    jobs: Table<
      JobRow,
      | "id"
      | "status"
      | "phase"
      | "progress_done"
      | "progress_total"
      | "progress_unit"
      | "attempts"
      | "created_at"
      | "result"
      | NullableKeys<JobRow>
    >;
    imports: Table<
      ImportTableRow,
      | "id"
      | "status"
      | "rows_written"
      | "created_at"
      | "mapping"
      | "options"
      | "report"
      | NullableKeys<ImportTableRow>
    >;
    site_series: Table<SiteSeriesRow, never>;
    half_hours: Table<HalfHourRow, NullableKeys<HalfHourRow>>;
    site_coverage: Table<
      SiteCoverageRow,
      "stored_half_hours" | "present_half_hours" | NullableKeys<SiteCoverageRow>
    >;
    evenings: Table<
      EveningRow,
      "id" | "computed_at" | "label_source" | "reviewed" | "version" | NullableKeys<EveningRow>
    >;
    evening_events: Table<EveningEventRow, "id" | "created_at" | NullableKeys<EveningEventRow>>;
    api_tokens: Table<ApiTokenRow, "id" | "created_at" | NullableKeys<ApiTokenRow>>;
    import_templates: Table<ImportTemplateRow, "updated_at" | NullableKeys<ImportTemplateRow>>;
    mail_outbox: Table<
      MailOutboxRow,
      "id" | "status" | "attempts" | "next_attempt_at" | "created_at" | NullableKeys<MailOutboxRow>
    >;
    invitations: Table<InvitationRow, "id" | "sent_at" | "created_at" | NullableKeys<InvitationRow>>;
    password_resets: Table<PasswordResetRow, "id" | "created_at" | NullableKeys<PasswordResetRow>>;
    notification_preferences: Table<
      NotificationPreferencesRow,
      "import_notices" | "weekly_digest" | "updated_at"
    >;
    anomalies: Table<AnomalyRow, "id" | "detected_at" | NullableKeys<AnomalyRow>>;
    ustar_thresholds: Table<
      UstarThresholdRow,
      | "id"
      | "flux_series"
      | "points"
      | "temperature_classes_used"
      | "bootstrap_resamples"
      | "bootstrap_found"
      | "computed_at"
      | NullableKeys<UstarThresholdRow>
    >;
    weak_turbulence: Table<
      WeakTurbulenceRow,
      "flux_series" | "computed_at" | NullableKeys<WeakTurbulenceRow>
    >;
  }
}
