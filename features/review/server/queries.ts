import "server-only";
import type { Knex } from "knex";
import { db } from "@/lib/db/knex";
import { compiledRead } from "@/lib/db/compiled";
import { emptyMetrics, type EveningMetrics } from "@/lib/classify/evenings";
import { DEFAULT_RULE_SET, parseRuleSet, type RuleSet } from "@/lib/classify/rules";
import { AuthError } from "@/lib/auth/session";
import type {
  DateRange,
  EveningDetail,
  EveningSeries,
  EveningSummary,
  HistoryEntry,
  Label,
  QueueItem,
  RegimePoint,
  SeriesColumn,
  WindowSpan,
} from "@/features/review/schemas";
import { thresholdRows } from "@/features/review/thresholds";
import { rankQueue, type QueueInput } from "@/features/review/queue";
import {
  ACCESS_COLUMNS,
  judgeAccess,
  withEveningAccess,
  type AccessRow,
  type ReviewSite,
} from "@/features/review/server/access";
import type { SessionUser } from "@/lib/auth/session";
import type { Role } from "@/lib/auth/roles";
import { eveningsStamp, StampedCache } from "@/lib/evenings/stamp";
import { TRACER_SLOTS } from "@/lib/evenings/load";
import { anomaliesInRange, weakTurbulenceForSite } from "@/lib/anomalies/server/queries";
import { flagsByDate } from "@/features/review/flags";

/*
 * Reads of the review feature. Callers have checked access (server/access.ts). Dates leave the
 * database as strings (DATE_FORMAT), so nothing depends on the connection's time zone and no Date
 * objects are built per row.
 */

const HOUR_MS = 3_600_000;
const ISO_UTC = "'%Y-%m-%dT%H:%i:%sZ'";

const SUMMARY_COLUMNS = [
  "id",
  db.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS date"),
  "final_label",
  "auto_label",
  "label_source",
  db.raw(`DATE_FORMAT(sunset_utc, ${ISO_UTC}) AS sunset_utc`),
  db.raw(`DATE_FORMAT(civil_dusk_utc, ${ISO_UTC}) AS civil_dusk_utc`),
  "rule",
  "reasons",
  "metrics",
  "reviewed",
  "version",
];

type SummaryRow = {
  id: number;
  date: string;
  final_label: Label;
  auto_label: Label;
  label_source: "auto" | "override";
  sunset_utc: string | null;
  civil_dusk_utc: string | null;
  rule: string | null;
  reasons: unknown;
  metrics: unknown;
  reviewed: number | boolean;
  version: number;
};

// MariaDB's JSON is LONGTEXT: mysql2 hands it over as a string.
function parsed<T>(v: unknown, fallback: T): T {
  if (v === null || v === undefined) return fallback;
  if (typeof v !== "string") return v as T;
  try {
    return JSON.parse(v) as T;
  } catch {
    return fallback;
  }
}

function toSummary(r: SummaryRow): EveningSummary {
  return {
    id: Number(r.id),
    date: r.date,
    label: r.final_label,
    autoLabel: r.auto_label,
    source: r.label_source,
    sunsetUtc: r.sunset_utc,
    civilDuskUtc: r.civil_dusk_utc,
    rule: r.rule,
    reasons: parsed<string[]>(r.reasons, []),
    metrics: parsed<EveningMetrics>(r.metrics, emptyMetrics()),
    reviewed: Boolean(r.reviewed),
    version: r.version,
  };
}

/** Evenings of a site between two local dates (inclusive), by date. */
export async function listEvenings(siteId: number, range: DateRange): Promise<EveningSummary[]> {
  const rows: SummaryRow[] = await db("evenings")
    .where("site_id", siteId)
    .whereBetween("local_date", [range.from, range.to])
    .orderBy("local_date")
    .select(SUMMARY_COLUMNS);
  return rows.map(toSummary);
}

// Metrics leave the calendar with four significant digits: the stored doubles carry 17, which
// nearly doubled the site-year answer, and no reader of a month grid needs more. The evening
// endpoint keeps them whole.
function roundedJson(v: unknown, fallback: unknown): string {
  const value = parsed<unknown>(v, fallback);
  return JSON.stringify(value, (_k, x: unknown) =>
    typeof x === "number" && !Number.isInteger(x) && Number.isFinite(x) ? Number(x.toPrecision(4)) : x,
  );
}

/**
 * A calendar answer: the JSON body as bytes and its entity tag. (It is not kept compressed: Next
 * drops a route handler's own Content-Encoding and compresses for the client itself.)
 */
export type CalendarBody = { body: Uint8Array<ArrayBuffer>; etag: string };

// Built bodies, valid only at the change stamp of their site and period (lib/evenings/stamp.ts).
// A site-year is about 300 kB; 48 MB holds every month and year a department has open.
const calendarCache = new StampedCache<CalendarBody>(400, 48 * 1024 * 1024);
// Bumped when the shape of the body changes, so that no browser keeps an old body on a 304.
const CALENDAR_FORMAT = "c1";

/** Empties the calendar cache (tests). */
export function clearCalendarCache(): void {
  calendarCache.clear();
}

async function buildCalendar(siteId: number, range: DateRange) {
  // One snapshot for the stamp and the rows, so the entry is exactly the state the stamp names.
  const { stamp, rows } = await db.transaction(async (trx) => {
    const at = await eveningsStamp({ siteIds: [siteId], ...range }, trx);
    const found: SummaryRow[] = await trx("evenings")
      .where("site_id", siteId)
      .whereBetween("local_date", [range.from, range.to])
      .orderBy("local_date")
      .select(SUMMARY_COLUMNS);
    return { stamp: at, rows: found };
  });
  const parts = rows.map(
    (r) =>
      `{"id":${Number(r.id)},"date":"${r.date}","label":"${r.final_label}","autoLabel":"${r.auto_label}","source":"${r.label_source}",` +
      `"sunsetUtc":${JSON.stringify(r.sunset_utc)},"civilDuskUtc":${JSON.stringify(r.civil_dusk_utc)},"rule":${JSON.stringify(r.rule)},` +
      `"reasons":${roundedJson(r.reasons, [])},"metrics":${roundedJson(r.metrics, emptyMetrics())},` +
      `"reviewed":${r.reviewed ? "true" : "false"},"version":${Number(r.version)}}`,
  );
  const body = new TextEncoder().encode(`{"evenings":[${parts.join(",")}]}`);
  return { stamp, value: { body, etag: `"${CALENDAR_FORMAT}.${stamp}"` }, bytes: body.byteLength };
}

/**
 * The body of GET /api/sites/:id/evenings (`{ evenings: EveningSummary[] }`, metrics to four
 * significant digits) and its ETag, for the period's change `stamp` as siteAccessStamped read it
 * with the access check. The body built at that stamp is served from memory and rebuilt when the
 * evenings changed since: a change is visible to the very next request.
 */
export async function listEveningsBody(siteId: number, range: DateRange, stamp: string): Promise<CalendarBody> {
  return calendarCache.get(`${siteId}|${range.from}|${range.to}`, stamp, () => buildCalendar(siteId, range));
}

/** First and last local date with an evening at a site, or null when it has none. */
export async function eveningSpan(siteId: number): Promise<{ first: string; last: string } | null> {
  const row: { first: string | null; last: string | null } | undefined = await db("evenings")
    .where("site_id", siteId)
    .first(
      db.raw("DATE_FORMAT(MIN(local_date), '%Y-%m-%d') AS first"),
      db.raw("DATE_FORMAT(MAX(local_date), '%Y-%m-%d') AS last"),
    );
  return row?.first && row.last ? { first: row.first, last: row.last } : null;
}

// Rule sets are immutable once written (a change is a new version), so caching by id is safe.
const ruleSetCache = new Map<number, { rules: RuleSet; name: string | null }>();

/** The rule set with id `id`, or the default rules when the evening names none. */
export async function ruleSetById(id: number | null): Promise<{ rules: RuleSet; name: string | null }> {
  if (id === null) return { rules: DEFAULT_RULE_SET, name: null };
  const hit = ruleSetCache.get(id);
  if (hit) return hit;
  const row: { definition: unknown; name: string } | undefined = await db("rule_sets")
    .where({ id })
    .first("definition", "name");
  let rules = DEFAULT_RULE_SET;
  try {
    if (row) rules = parseRuleSet(parsed<unknown>(row.definition, null));
  } catch {
    // An unreadable stored definition must not hide the evening; the defaults stand in.
  }
  const entry = { rules, name: row?.name ?? null };
  ruleSetCache.set(id, entry);
  return entry;
}

type DetailRow = SummaryRow & {
  site_id: number;
  margins: unknown;
  rule_set_id: number | null;
  rule_set_version: number | null;
  computed_at: string;
  override_note: string | null;
  reviewed_by_name: string | null;
  reviewed_at: string | null;
  previous_ref: string | null;
  next_ref: string | null;
  history_json: unknown;
  tracers_json: unknown;
};

const MEASURES: Array<{
  col: string;
  key: string;
  name: string;
  unit: string;
  circular?: boolean;
  core?: boolean;
}> = [
  { col: "w_sigma", key: "W_SIGMA", name: "σw", unit: "m/s", core: true },
  { col: "ustar", key: "USTAR", name: "u*", unit: "m/s", core: true },
  { col: "ws", key: "WS", name: "Wind speed", unit: "m/s", core: true },
  { col: "wd", key: "WD", name: "Wind direction", unit: "°", circular: true, core: true },
  { col: "zl", key: "ZL", name: "z/L", unit: "1", core: true },
  { col: "h", key: "H", name: "H", unit: "W/m²", core: true },
  { col: "ta", key: "TA", name: "Air temperature", unit: "°C", core: true },
  { col: "le", key: "LE", name: "LE", unit: "W/m²" },
  { col: "sw_in", key: "SW_IN", name: "Shortwave in", unit: "W/m²" },
  { col: "rh", key: "RH", name: "Relative humidity", unit: "%" },
  { col: "vpd", key: "VPD", name: "VPD", unit: "hPa" },
  { col: "pa", key: "PA", name: "Pressure", unit: "kPa" },
  { col: "fc", key: "FC", name: "CO₂ flux", unit: "µmol/m²/s" },
  { col: "co2", key: "CO2", name: "CO₂", unit: "µmol/mol" },
];

const TRACER_COLUMNS = Array.from({ length: TRACER_SLOTS }, (_, i) => `tracer_${i + 1}`);

type Tracer = { slot: number; name: string; unit: string };

// The tracer slots in use at a site, as one JSON array read inside another query.
const TRACERS_JSON = `CAST((SELECT JSON_ARRAYAGG(JSON_OBJECT('slot', t.slot, 'name', t.name, 'unit', t.unit) ORDER BY t.slot)
   FROM site_series t WHERE t.site_id = e.site_id) AS CHAR) AS tracers_json`;

// Half-hours of a site starting inside (fromS, toS), Unix seconds, with their start in ms as `t`.
const windowRows = compiledRead<
  { siteId: number; fromS: number; toS: number },
  Record<string, number | null> & { t: number | string }
>({ siteId: -7_321, fromS: -7_322, toS: -7_323 }, (p) =>
  db("half_hours")
    .where("site_id", p.siteId)
    .where("start_utc", ">", db.raw("FROM_UNIXTIME(?)", [p.fromS]))
    .where("start_utc", "<", db.raw("FROM_UNIXTIME(?)", [p.toS]))
    .orderBy("start_utc")
    .select([db.raw("UNIX_TIMESTAMP(start_utc) * 1000 AS t"), ...MEASURES.map((m) => m.col), ...TRACER_COLUMNS]),
);

/**
 * The half-hours from 4 h before to 4 h after `centreMs`, as plot-ready columns. Every tracer slot
 * is read; `tracers` (the slots in use, read with the evening) names those that are shown.
 */
async function eveningSeries(siteId: number, centreMs: number, tracers: Tracer[]): Promise<EveningSeries> {
  // Periods that overlap the window: a half-hour starting 30 min before it still reaches in.
  const fromMs = centreMs - 4 * HOUR_MS - 30 * 60_000;
  const toMs = centreMs + 4 * HOUR_MS;
  const rows = await windowRows({ siteId, fromS: fromMs / 1000, toS: toMs / 1000 });
  const starts = rows.map((r) => Number(r.t));
  let periodMinutes = 30;
  for (let i = 1; i < starts.length; i++)
    periodMinutes = Math.min(periodMinutes, (starts[i]! - starts[i - 1]!) / 60_000);
  if (!(periodMinutes > 0)) periodMinutes = 30;
  const half = (periodMinutes * 60_000) / 2;
  const columns: SeriesColumn[] = [];
  const values = (col: string) =>
    rows.map((r) => (typeof r[col] === "number" && Number.isFinite(r[col]) ? r[col] : null));
  for (const m of MEASURES) {
    const v = values(m.col);
    if (!m.core && v.every((x) => x === null)) continue;
    columns.push({ key: m.key, name: m.name, unit: m.unit, circular: m.circular, values: v });
  }
  for (const t of tracers) {
    columns.push({ key: `tracer_${t.slot}`, name: t.name, unit: t.unit, values: values(`tracer_${t.slot}`) });
  }
  return { timeMs: starts.map((s) => s + half), periodMinutes, columns };
}

type HistoryRow = {
  id: number;
  kind: HistoryEntry["kind"];
  fromLabel: Label | null;
  toLabel: Label | null;
  note: string | null;
  user: string | null;
  ruleSetVersion: number | null;
  at: string;
};

// The history of the evening, as one JSON array read inside the detail query. JSON_ARRAYAGG is
// bounded by group_concat_max_len: a history too long for it comes back cut short and is read
// again with its own query (`history`). The arrays travel as text (CAST AS CHAR), so that a cut
// one reaches jsonArray() instead of failing in the driver's own JSON parsing.
const HISTORY_JSON = `CAST((SELECT JSON_ARRAYAGG(JSON_OBJECT('id', v.id, 'kind', v.kind, 'fromLabel', v.from_label,
     'toLabel', v.to_label, 'note', v.note, 'user', u.display_name, 'ruleSetVersion', v.rule_set_version,
     'at', DATE_FORMAT(v.created_at, '%Y-%m-%dT%H:%i:%s.%fZ')) ORDER BY v.id)
   FROM evening_events v LEFT JOIN users u ON u.id = v.user_id WHERE v.evening_id = e.id) AS CHAR) AS history_json`;

function toHistory(rows: HistoryRow[]): HistoryEntry[] {
  // %f gives microseconds; keep milliseconds like JavaScript does
  return rows.map((r) => ({ ...r, id: Number(r.id), at: r.at.replace(/\.(\d{3})\d*Z$/, ".$1Z") }));
}

async function history(eveningId: number): Promise<HistoryEntry[]> {
  const rows: HistoryRow[] = await db("evening_events as v")
    .leftJoin("users as u", "u.id", "v.user_id")
    .where("v.evening_id", eveningId)
    .orderBy("v.id")
    .select(
      "v.id",
      "v.kind",
      "v.from_label as fromLabel",
      "v.to_label as toLabel",
      "v.note",
      "u.display_name as user",
      "v.rule_set_version as ruleSetVersion",
      db.raw("DATE_FORMAT(v.created_at, '%Y-%m-%dT%H:%i:%s.%fZ') AS at"),
    );
  return toHistory(rows);
}

// A JSON array built by the database, or null when it is missing or cut short.
function jsonArray<T>(v: unknown): T[] | null {
  if (v === null || v === undefined) return [];
  const value = parsed<unknown>(v, null);
  return Array.isArray(value) ? (value as T[]) : null;
}

// The previous and next evening of the site, as "id date", read by the detail query itself.
function neighbourRef(dir: "previous" | "next") {
  const [op, order] = dir === "previous" ? ["<", "DESC"] : [">", "ASC"];
  return db.raw(
    `(SELECT CONCAT(n.id, ' ', DATE_FORMAT(n.local_date, '%Y-%m-%d')) FROM evenings n
       WHERE n.site_id = e.site_id AND n.local_date ${op} e.local_date ORDER BY n.local_date ${order} LIMIT 1) AS ${dir}_ref`,
  );
}

function neighbourOf(ref: string | null): { id: number; date: string } | null {
  if (!ref) return null;
  const [id, date] = ref.split(" ");
  return id && date ? { id: Number(id), date } : null;
}

// The evening row with everything read beside it: reviewer, neighbours, history and tracer names.
function detailQuery(eveningId: number): Knex.QueryBuilder {
  return db("evenings as e")
    .leftJoin("users as r", "r.id", "e.reviewed_by")
    .where("e.id", eveningId)
    .select([
      ...SUMMARY_COLUMNS.map((c) => (typeof c === "string" ? `e.${c}` : c)),
      "e.site_id",
      "e.margins",
      "e.rule_set_id",
      "e.rule_set_version",
      db.raw(`DATE_FORMAT(e.computed_at, ${ISO_UTC}) AS computed_at`),
      "e.override_note",
      "r.display_name as reviewed_by_name",
      db.raw(`DATE_FORMAT(e.reviewed_at, ${ISO_UTC}) AS reviewed_at`),
      neighbourRef("previous"),
      neighbourRef("next"),
      db.raw(HISTORY_JSON),
      db.raw(TRACERS_JSON),
    ])
    .limit(1);
}

// The detail reads of every evening page and GET /api/evenings/:id, compiled once (lib/db/compiled.ts).
const detailOfSite = compiledRead<{ eveningId: number; siteId: number }, DetailRow>(
  { eveningId: -7_301, siteId: -7_302 },
  (p) => detailQuery(p.eveningId).where("e.site_id", p.siteId),
);
const detailForUser = compiledRead<{ eveningId: number; userId: string }, DetailRow & AccessRow>(
  { eveningId: -7_311, userId: "\u0000sentinel:user" },
  (p) => withEveningAccess(detailQuery(p.eveningId), p.userId).select(ACCESS_COLUMNS),
);

async function assembleDetail(row: DetailRow, site: ReviewSite): Promise<EveningDetail> {
  const summary = toSummary(row);
  const margins = parsed<Record<string, number>>(row.margins, {});
  const { rules, name } = await ruleSetById(row.rule_set_id);
  const centreMs = summary.sunsetUtc
    ? Date.parse(summary.sunsetUtc)
    : Date.parse(`${summary.date}T18:00:00Z`) - site.utcOffsetHours * HOUR_MS;
  const windows: WindowSpan[] = (["afternoon", "transition", "evening"] as const).map((w) => ({
    name: w,
    startMs: centreMs + rules.windows[w].startMinutes * 60_000,
    endMs: centreMs + rules.windows[w].endMinutes * 60_000,
  }));
  const storedHistory = jsonArray<HistoryRow>(row.history_json);
  const [events, series] = await Promise.all([
    storedHistory ? toHistory(storedHistory) : history(summary.id),
    // at most 8 short entries: never cut short like a long history
    eveningSeries(site.id, centreMs, parsed<Tracer[]>(row.tracers_json, [])),
  ]);
  return {
    evening: {
      ...summary,
      siteId: row.site_id,
      margins,
      ruleSetVersion: row.rule_set_version,
      ruleSetName: name,
      computedAt: row.computed_at,
      overrideNote: row.override_note,
      reviewedBy: row.reviewed_by_name,
      reviewedAt: row.reviewed_at,
    },
    centreMs,
    windows: summary.sunsetUtc ? windows : [],
    thresholds: thresholdRows(rules, summary.metrics, margins, summary.rule),
    ruleDescription: rules.rules.find((r) => r.id === summary.rule)?.description ?? null,
    history: events,
    series,
    neighbours: { previous: neighbourOf(row.previous_ref), next: neighbourOf(row.next_ref) },
  };
}

/**
 * Everything the evening page shows, for a caller who may see `site` (checked already).
 * Throws AuthError("not_found") for an unknown id or an evening of another site.
 */
export async function getEveningDetail(eveningId: number, site: ReviewSite): Promise<EveningDetail> {
  const rows = await detailOfSite({ eveningId, siteId: site.id });
  const row = rows[0];
  if (!row) throw new AuthError("not_found");
  return assembleDetail(row, site);
}

/**
 * Everything the evening page shows, if `user` may see the evening (at least `minimum`):
 * the access check is read by the same query as the evening, and the half-hours after it.
 */
export async function eveningDetailFor(
  user: SessionUser,
  eveningId: number,
  minimum: Role = "viewer",
): Promise<EveningDetail> {
  const rows = await detailForUser({ eveningId, userId: user.id });
  const { site } = judgeAccess(rows[0], minimum);
  return assembleDetail(rows[0]!, site);
}

/** The evenings of a period ranked by how much they need a person (see rankQueue). */
export async function getQueue(siteId: number, range: DateRange): Promise<QueueItem[]> {
  const [rows, anomalies, weak] = await Promise.all([
    db("evenings")
      .where("site_id", siteId)
      .whereBetween("local_date", [range.from, range.to])
      .orderBy("local_date")
      .select<Array<SummaryRow & { margins: unknown; rule_set_id: number | null }>>([
        ...SUMMARY_COLUMNS,
        "margins",
        "rule_set_id",
      ]),
    anomaliesInRange(siteId, range.from, range.to),
    // one row per night: a range is at most a few years (rangeSchema), so no page is needed
    weakTurbulenceForSite(siteId, { from: range.from, to: range.to }, { limit: 100_000 }),
  ]);
  const flags = flagsByDate(anomalies, weak.evenings);
  const ruleSets = new Map<number | null, RuleSet>();
  for (const id of new Set(rows.map((r) => r.rule_set_id))) ruleSets.set(id, (await ruleSetById(id)).rules);
  const inputs: Array<QueueInput & { ruleSetId: number | null }> = rows.map((r) => ({
    ...toSummary(r),
    margins: parsed<Record<string, number>>(r.margins, {}),
    ruleSetId: r.rule_set_id,
    flags: flags.get(r.date),
  }));
  return rankQueue(
    inputs,
    (row) => ruleSets.get((row as QueueInput & { ruleSetId: number | null }).ruleSetId) ?? DEFAULT_RULE_SET,
  );
}

/** Evening-window sigma_w and wind speed of every evening of a site that has both. */
export async function getRegimePoints(siteId: number): Promise<RegimePoint[]> {
  const rows: Array<{
    id: number;
    date: string;
    final_label: Label;
    ws_evening: number;
    sigma_w_evening: number;
  }> = await db("evenings")
    .where("site_id", siteId)
    .whereNotNull("sigma_w_evening")
    .whereNotNull("ws_evening")
    .orderBy("local_date")
    .select(
      "id",
      db.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS date"),
      "final_label",
      "ws_evening",
      "sigma_w_evening",
    );
  return rows.map((r) => ({
    id: Number(r.id),
    date: r.date,
    label: r.final_label,
    ws: r.ws_evening,
    sigmaW: r.sigma_w_evening,
  }));
}
