import "server-only";
import type { Knex } from "knex";
import { classifyTable, emptyMetrics, type EveningResult, type Label } from "@/lib/classify/evenings";
import type { SiteParams } from "@/lib/classify/site";
import { db } from "@/lib/db/knex";
import type { InsertRow, SiteRow as TableSiteRow } from "@/lib/db/tables";
import { loadHalfHours } from "@/lib/evenings/load";
import { ensureActiveRuleSet, type StoredRuleSet } from "@/lib/evenings/rulesets";
import { localDateOf, localMidnightUtcMs } from "@/lib/physics/sun";

const DAY_MS = 86_400_000;
const BATCH = 500;
/** Reason given to a stored evening whose data are gone (e.g. its import was deleted). */
export const NO_DATA_REASON = "no tower data are stored for this evening any more";

export interface RecomputeOptions {
  /** classify with this rule set instead of the site's active one (which is created when missing) */
  ruleSet?: StoredRuleSet;
  /** called with evenings written so far and the total, after each batch */
  onProgress?: (done: number, total: number) => void | Promise<void>;
  /** run inside the caller's transaction instead of an own one */
  trx?: Knex.Transaction;
}

export interface RecomputeResult {
  /** evenings classified in the scope */
  computed: number;
  inserted: number;
  /** stored evenings whose automatic result changed (label, metrics, reasons or rule set) */
  updated: number;
  unchanged: number;
  /** evenings whose automatic label changed (each got an 'auto' evening_event) */
  labelChanged: number;
  /** local dates written, inclusive */
  from: string | null;
  to: string | null;
  /**
   * "period" = the dates asked for; "site" = every evening of the site, because the rule set has
   * site-relative (percentile) thresholds, which depend on all of the site's evenings.
   */
  scope: "period" | "site";
  ruleSetId: number;
  ruleSetVersion: number;
}

type SiteRow = Pick<
  TableSiteRow,
  | "id"
  | "latitude"
  | "longitude"
  | "elevation_m"
  | "measurement_height_m"
  | "canopy_height_m"
  | "displacement_height_m"
  | "utc_offset_hours"
>;

type StoredEvening = {
  id: number;
  d: string;
  auto_label: Label;
  rule: string | null;
  reasons: unknown;
  margins: unknown;
  metrics: unknown;
  sunset_ms: number | string | null;
  dusk_ms: number | string | null;
  rule_set_id: number | null;
  rule_set_version: number | null;
};

/** The values recompute writes for one evening, serialised as stored. */
type Computed = {
  date: string;
  label: Label;
  rule: string | null;
  reasons: string;
  margins: string;
  metrics: string;
  sunsetMs: number | null;
  duskMs: number | null;
  sigmaW: number | null;
  ws: number | null;
};

function computedOf(r: EveningResult): Computed {
  return {
    date: r.date,
    label: r.label,
    rule: r.rule,
    reasons: JSON.stringify(r.reasons),
    margins: JSON.stringify(r.margins),
    metrics: JSON.stringify(r.metrics),
    sunsetMs: r.sunsetUtc === null ? null : Date.parse(r.sunsetUtc),
    duskMs: r.civilDuskUtc === null ? null : Date.parse(r.civilDuskUtc),
    sigmaW: r.metrics.sigmaWEvening,
    ws: r.metrics.windSpeedEvening,
  };
}

// The driver may hand JSON columns back parsed or as text; re-serialising parsed values gives the
// exact text written (key order and shortest number forms survive a JSON round trip).
const jsonText = (v: unknown) => (typeof v === "string" ? v : JSON.stringify(v));

const msOrNull = (v: number | string | null) => (v === null ? null : Math.round(Number(v) * 1000));

function same(c: Computed, s: StoredEvening, rs: StoredRuleSet): boolean {
  return (
    c.label === s.auto_label &&
    c.rule === s.rule &&
    c.reasons === jsonText(s.reasons) &&
    c.margins === jsonText(s.margins) &&
    c.metrics === jsonText(s.metrics) &&
    c.sunsetMs === msOrNull(s.sunset_ms) &&
    c.duskMs === msOrNull(s.dusk_ms) &&
    s.rule_set_id === rs.id &&
    s.rule_set_version === rs.version
  );
}

/** The classifier's view of a sites row (the row's columns, the data clock's offset as a number). */
export function siteParamsOf(s: Omit<SiteRow, "id">): SiteParams {
  return {
    latitudeDeg: s.latitude,
    longitudeDeg: s.longitude,
    elevationM: s.elevation_m,
    measurementHeightM: s.measurement_height_m,
    canopyHeightM: s.canopy_height_m,
    displacementHeightM: s.displacement_height_m,
    utcOffsetHours: Number(s.utc_offset_hours),
  };
}

function hasSiteRelativeThresholds(rs: StoredRuleSet): boolean {
  return Object.values(rs.definition.thresholds).some((t) => t.kind === "percentile");
}

const DATE = /^\d{4}-\d{2}-\d{2}$/;

/**
 * (Re)classifies the evenings of a site for local dates fromDate..toDate (inclusive, on the data
 * clock) with the site's active rule set, and stores them: new evenings are inserted; stored ones
 * whose automatic result changed get the new automatic label, metrics, margins and rule set, a
 * bumped version and, when the automatic label changed, an 'auto' evening_event. final_label
 * follows the automatic label only where label_source = 'auto'; overrides stay on top. Evenings
 * whose result is identical are left untouched. A stored evening in the period with no data
 * left becomes unclassified (NO_DATA_REASON).
 *
 * Data are read from a day before to a day after the period (evening windows cross midnight).
 * A rule set with site-relative thresholds recomputes every evening of the site instead (see
 * RecomputeResult.scope). Everything happens in one transaction, in batches; the site row is
 * locked, so recomputes of one site run one after another.
 */
export async function recomputeEvenings(
  siteId: number,
  fromDate: string,
  toDate: string,
  options: RecomputeOptions = {},
): Promise<RecomputeResult> {
  if (!DATE.test(fromDate) || !DATE.test(toDate))
    throw new Error(`recomputeEvenings: dates must be YYYY-MM-DD (got ${fromDate}, ${toDate})`);
  if (fromDate > toDate) throw new Error(`recomputeEvenings: ${fromDate} is after ${toDate}`);
  const run = (trx: Knex.Transaction) => recomputeIn(trx, siteId, fromDate, toDate, options);
  return options.trx ? run(options.trx) : db.transaction(run);
}

async function recomputeIn(
  trx: Knex.Transaction,
  siteId: number,
  fromDate: string,
  toDate: string,
  options: RecomputeOptions,
): Promise<RecomputeResult> {
  const [sites] = (await trx.raw(
    `SELECT id, latitude, longitude, elevation_m, measurement_height_m, canopy_height_m,
            displacement_height_m, utc_offset_hours FROM sites WHERE id = ? FOR UPDATE`,
    [siteId],
  )) as [SiteRow[]];
  const site = sites[0];
  if (!site) throw new Error(`no site ${siteId}`);
  const params = siteParamsOf(site);
  const offset = params.utcOffsetHours;
  const ruleSet = options.ruleSet ?? (await ensureActiveRuleSet(siteId, trx));

  let scope: RecomputeResult["scope"] = "period";
  let from = fromDate;
  let to = toDate;
  if (hasSiteRelativeThresholds(ruleSet)) {
    const [span] = (await trx.raw(
      "SELECT UNIX_TIMESTAMP(MIN(start_utc)) AS a, UNIX_TIMESTAMP(MAX(start_utc)) AS b FROM half_hours WHERE site_id = ?",
      [siteId],
    )) as [Array<{ a: number | string | null; b: number | string | null }>];
    const [stored] = (await trx.raw(
      "SELECT DATE_FORMAT(MIN(local_date), '%Y-%m-%d') AS a, DATE_FORMAT(MAX(local_date), '%Y-%m-%d') AS b FROM evenings WHERE site_id = ?",
      [siteId],
    )) as [Array<{ a: string | null; b: string | null }>];
    const candidates = [fromDate, toDate];
    if (span[0]?.a != null && span[0].b != null) {
      candidates.push(
        localDateOf(Number(span[0].a) * 1000, offset),
        localDateOf(Number(span[0].b) * 1000, offset),
      );
    }
    if (stored[0]?.a) candidates.push(stored[0].a);
    if (stored[0]?.b) candidates.push(stored[0].b);
    candidates.sort();
    from = candidates[0] as string;
    to = candidates[candidates.length - 1] as string;
    scope = "site";
  }

  const fromMs = localMidnightUtcMs(from, offset) - DAY_MS;
  const toMs = localMidnightUtcMs(to, offset) + 2 * DAY_MS;
  const table = await loadHalfHours(siteId, fromMs, toMs, trx);
  const results = classifyTable(table, params, ruleSet.definition).filter(
    (r) => r.date >= from && r.date <= to,
  );
  const computed = new Map(results.map((r) => [r.date, computedOf(r)]));

  const [storedRows] = (await trx.raw(
    `SELECT id, DATE_FORMAT(local_date, '%Y-%m-%d') AS d, auto_label, rule, reasons, margins, metrics,
            UNIX_TIMESTAMP(sunset_utc) AS sunset_ms, UNIX_TIMESTAMP(civil_dusk_utc) AS dusk_ms,
            rule_set_id, rule_set_version
       FROM evenings WHERE site_id = ? AND local_date BETWEEN ? AND ?`,
    [siteId, from, to],
  )) as [StoredEvening[]];
  const stored = new Map(storedRows.map((s) => [s.d, s]));
  // Stored evenings whose data vanished: unclassified, keeping their sun times.
  for (const s of storedRows) {
    if (computed.has(s.d)) continue;
    computed.set(s.d, {
      date: s.d,
      label: "unclassified",
      rule: null,
      reasons: JSON.stringify([NO_DATA_REASON]),
      margins: "{}",
      metrics: JSON.stringify(emptyMetrics()),
      sunsetMs: msOrNull(s.sunset_ms),
      duskMs: msOrNull(s.dusk_ms),
      sigmaW: null,
      ws: null,
    });
  }

  const todo: Computed[] = [];
  let unchanged = 0;
  for (const c of computed.values()) {
    const s = stored.get(c.date);
    if (s && same(c, s, ruleSet)) unchanged++;
    else todo.push(c);
  }
  todo.sort((a, b) => (a.date < b.date ? -1 : a.date > b.date ? 1 : 0));

  const total = computed.size;
  let done = unchanged;
  let inserted = 0;
  let labelChanged = 0;
  await options.onProgress?.(done, total);
  for (let i = 0; i < todo.length; i += BATCH) {
    const batch = todo.slice(i, i + BATCH);
    await upsertBatch(trx, siteId, ruleSet, batch);
    const [ids] = (await trx.raw(
      `SELECT id, DATE_FORMAT(local_date, '%Y-%m-%d') AS d FROM evenings
        WHERE site_id = ? AND local_date IN (${batch.map(() => "?").join(",")})`,
      [siteId, ...batch.map((c) => c.date)],
    )) as [Array<{ id: number; d: string }>];
    const idOf = new Map(ids.map((r) => [r.d, Number(r.id)]));
    const events: Array<Record<string, unknown>> = [];
    for (const c of batch) {
      const before = stored.get(c.date);
      if (!before) inserted++;
      if (before?.auto_label === c.label) continue;
      if (before) labelChanged++;
      events.push({
        evening_id: idOf.get(c.date),
        kind: "auto",
        from_label: before?.auto_label ?? null,
        to_label: c.label,
        note: before ? null : "first classification",
        user_id: null,
        rule_set_version: ruleSet.version,
      });
    }
    if (events.length > 0) await trx("evening_events").insert(events as Array<InsertRow<"evening_events">>);
    done += batch.length;
    await options.onProgress?.(done, total);
  }

  return {
    computed: total,
    inserted,
    updated: todo.length - inserted,
    unchanged,
    labelChanged,
    from: total > 0 ? from : null,
    to: total > 0 ? to : null,
    scope,
    ruleSetId: ruleSet.id,
    ruleSetVersion: ruleSet.version,
  };
}

const COLS = [
  "site_id",
  "local_date",
  "sunset_utc",
  "civil_dusk_utc",
  "auto_label",
  "rule",
  "reasons",
  "margins",
  "metrics",
  "sigma_w_evening",
  "ws_evening",
  "rule_set_id",
  "rule_set_version",
  "computed_at",
  "final_label",
  "label_source",
  "version",
] as const;

// One multi-row statement per batch. On an existing evening the update keeps review state and
// overrides: final_label moves only where label_source is 'auto'.
async function upsertBatch(
  trx: Knex.Transaction,
  siteId: number,
  rs: StoredRuleSet,
  batch: Computed[],
): Promise<void> {
  const values: Knex.RawBinding[] = [];
  const finite = (v: number | null) => (v !== null && Number.isFinite(v) ? v : null);
  for (const c of batch) {
    values.push(
      siteId,
      c.date,
      c.sunsetMs === null ? null : new Date(c.sunsetMs),
      c.duskMs === null ? null : new Date(c.duskMs),
      c.label,
      c.rule,
      c.reasons,
      c.margins,
      c.metrics,
      finite(c.sigmaW),
      finite(c.ws),
      rs.id,
      rs.version,
      c.label,
    );
  }
  const row = `(?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, NOW(3), ?, 'auto', 1)`;
  await trx.raw(
    `INSERT INTO evenings (${COLS.join(", ")}) VALUES ${batch.map(() => row).join(", ")}
     ON DUPLICATE KEY UPDATE
       final_label = IF(label_source = 'auto', VALUES(auto_label), final_label),
       sunset_utc = VALUES(sunset_utc),
       civil_dusk_utc = VALUES(civil_dusk_utc),
       auto_label = VALUES(auto_label),
       rule = VALUES(rule),
       reasons = VALUES(reasons),
       margins = VALUES(margins),
       metrics = VALUES(metrics),
       sigma_w_evening = VALUES(sigma_w_evening),
       ws_evening = VALUES(ws_evening),
       rule_set_id = VALUES(rule_set_id),
       rule_set_version = VALUES(rule_set_version),
       computed_at = VALUES(computed_at),
       version = version + 1`,
    values,
  );
}
