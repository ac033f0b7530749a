import "server-only";
import { createHash } from "node:crypto";
import { Readable } from "node:stream";
import { ZipFile } from "yazl";
import { db } from "@/lib/db/knex";
import { jsonColumn } from "@/lib/db/json";
import type { SessionUser } from "@/lib/auth/session";
import { LABEL_CAUTION } from "@/lib/ui/caution";
import packageJson from "@/package.json";
import {
  EVENING_COLUMNS,
  HALF_HOUR_MEASURES,
  METRIC_KEYS,
  type ExportQuery,
} from "@/features/exports/schemas";
import { csvLines, isoWithOffset, offsetText } from "@/features/exports/server/csv";
import type { ExportSite } from "@/features/exports/server/access";

/*
 * The export zip: evenings.csv, optionally half-hours.csv, and provenance.json. Rows are read
 * from the database page by page and written into the zip as they come, so a long half-hourly
 * record never sits whole in memory. provenance.json goes last because it names the row counts
 * and SHA-256 of the CSV files written before it.
 */

const PAGE = 5000;
const DAY_MS = 86_400_000;

type EveningRow = {
  local_date: string;
  sunset_utc: Date | null;
  civil_dusk_utc: Date | null;
  auto_label: string;
  final_label: string;
  label_source: "auto" | "override";
  override_note: string | null;
  rule: string | null;
  rule_set_id: number | null;
  rule_set_version: number | null;
  reviewed: number | boolean;
  metrics: unknown;
};

type FileStats = { name: string; rows: number; bytes: number; sha256: string; columns: string[] };

const num = (v: unknown): number | null => (typeof v === "number" && Number.isFinite(v) ? v : null);

/** Local midnight of a local date on the data clock, as a UTC instant. */
const localMidnightUtc = (date: string, offsetHours: number) => new Date(Date.parse(`${date}T00:00:00Z`) - offsetHours * 3_600_000);

async function* counted(name: string, columns: string[], body: AsyncGenerator<string>, stats: FileStats[]): AsyncGenerator<Buffer> {
  const hash = createHash("sha256");
  let bytes = 0;
  let rows = 0;
  const emit = (s: string) => {
    const b = Buffer.from(s, "utf8");
    hash.update(b);
    bytes += b.length;
    return b;
  };
  yield emit(csvLines([columns]));
  for await (const chunk of body) {
    rows += chunk === "" ? 0 : chunk.split("\r\n").length - 1;
    yield emit(chunk);
  }
  stats.push({ name, rows, bytes, sha256: hash.digest("hex"), columns });
}

async function* eveningChunks(site: ExportSite, q: ExportQuery, labels: Map<string, string>): AsyncGenerator<string> {
  let after = "";
  for (;;) {
    const page: EveningRow[] = await db("evenings")
      .where({ site_id: site.id })
      .andWhere("local_date", ">=", q.from)
      .andWhere("local_date", "<=", q.to)
      .andWhere("local_date", ">", after || "0000-01-01")
      .orderBy("local_date")
      .limit(PAGE)
      .select(
        db.raw("DATE_FORMAT(local_date, '%Y-%m-%d') AS local_date"),
        "sunset_utc",
        "civil_dusk_utc",
        "auto_label",
        "final_label",
        "label_source",
        "override_note",
        "rule",
        "rule_set_id",
        "rule_set_version",
        "reviewed",
        "metrics",
      );
    if (page.length === 0) return;
    const rows = page.map((e) => {
      labels.set(e.local_date, e.final_label);
      const m = jsonColumn<Record<string, unknown>>(e.metrics) ?? {};
      const coverage = (m.coverage ?? {}) as Record<string, unknown>;
      return [
        e.local_date,
        site.name,
        e.final_label,
        e.label_source === "override" ? "override" : "automatic",
        e.override_note,
        e.rule_set_version,
        e.rule,
        e.auto_label,
        Boolean(e.reviewed),
        e.sunset_utc ? isoWithOffset(e.sunset_utc, site.utc_offset_hours) : null,
        e.civil_dusk_utc ? isoWithOffset(e.civil_dusk_utc, site.utc_offset_hours) : null,
        ...METRIC_KEYS.map((k) => num(m[k])),
        num(coverage.afternoon),
        num(coverage.transition),
        num(coverage.evening),
      ];
    });
    yield csvLines(rows);
    after = page[page.length - 1]?.local_date ?? after;
    if (page.length < PAGE) return;
  }
}

// A half-hour belongs to the evening of the local date of (its start - 12 h): evenings run from
// local noon to the next local noon, so windows that reach past midnight stay whole.
const eveningDateOf = (startUtc: Date, offsetHours: number) =>
  new Date(startUtc.getTime() + offsetHours * 3_600_000 - DAY_MS / 2).toISOString().slice(0, 10);

async function* halfHourChunks(
  site: ExportSite,
  q: ExportQuery,
  tracers: Array<{ slot: number; name: string }>,
  labels: Map<string, string>,
): AsyncGenerator<string> {
  const from = localMidnightUtc(q.from, site.utc_offset_hours);
  const to = new Date(localMidnightUtc(q.to, site.utc_offset_hours).getTime() + DAY_MS);
  const cols = [...HALF_HOUR_MEASURES.map(([c]) => c), ...tracers.map((t) => `tracer_${t.slot}`)];
  let after = new Date(from.getTime() - 1000);
  for (;;) {
    const page: Array<Record<string, unknown> & { start_utc: Date }> = await db("half_hours")
      .where({ site_id: site.id })
      .andWhere("start_utc", ">", after)
      .andWhere("start_utc", "<", to)
      .orderBy("start_utc")
      .limit(PAGE)
      .select("start_utc", ...cols);
    if (page.length === 0) return;
    const rows = page.map((h) => {
      const evening = eveningDateOf(h.start_utc, site.utc_offset_hours);
      const inPeriod = evening >= q.from && evening <= q.to;
      return [
        isoWithOffset(h.start_utc, site.utc_offset_hours),
        ...cols.map((c) => num(h[c])),
        inPeriod && labels.has(evening) ? evening : null,
        inPeriod ? (labels.get(evening) ?? null) : null,
      ];
    });
    yield csvLines(rows);
    after = page[page.length - 1]?.start_utc ?? after;
    if (page.length < PAGE) return;
  }
}

type RuleSetRow = { id: number; version: number; name: string; definition: unknown; author_id: string | null; author_name: string | null; comment: string | null; created_at: Date };

async function provenance(site: ExportSite, q: ExportQuery, user: SessionUser, files: FileStats[], exportedAt: Date) {
  const from = localMidnightUtc(q.from, site.utc_offset_hours);
  const to = new Date(localMidnightUtc(q.to, site.utc_offset_hours).getTime() + DAY_MS);
  const used: Array<{ rule_set_id: number | null; n: number }> = await db("evenings")
    .where({ site_id: site.id })
    .andWhere("local_date", ">=", q.from)
    .andWhere("local_date", "<=", q.to)
    .groupBy("rule_set_id")
    .select("rule_set_id", db.raw("COUNT(*) AS n"));
  const ids = [...new Set([...used.map((u) => u.rule_set_id), site.active_rule_set_id].filter((v): v is number => v !== null))];
  const ruleSets: RuleSetRow[] = ids.length
    ? await db("rule_sets as r")
        .leftJoin("users as u", "u.id", "r.author_id")
        .whereIn("r.id", ids)
        .orderBy("r.version")
        .select("r.id", "r.version", "r.name", "r.definition", "r.author_id", "u.display_name as author_name", "r.comment", "r.created_at")
    : [];
  const sources: Array<{ id: number; original_name: string; sha256: string; size_bytes: number; status: string; created_at: Date; first_start_utc: Date | null; last_start_utc: Date | null }> =
    await db("imports")
      .whereIn(
        "id",
        db("half_hours").where({ site_id: site.id }).andWhere("start_utc", ">=", from).andWhere("start_utc", "<", to).whereNotNull("import_id").distinct("import_id"),
      )
      .orderBy("id")
      .select("id", "original_name", "sha256", "size_bytes", "status", "created_at", "first_start_utc", "last_start_utc");
  const offset = offsetText(site.utc_offset_hours);
  return {
    format: "gloaming-export",
    formatVersion: 1,
    caution: LABEL_CAUTION,
    software: { name: packageJson.name, version: packageJson.version },
    exportedAt: isoWithOffset(exportedAt, 0),
    exportedBy: { id: user.id, displayName: user.displayName, email: user.email },
    site: {
      id: site.id,
      name: site.name,
      latitudeDeg: site.latitude,
      longitudeDeg: site.longitude,
      elevationM: site.elevation_m,
      measurementHeightM: site.measurement_height_m,
      canopyHeightM: site.canopy_height_m,
      displacementHeightM: site.displacement_height_m,
      utcOffset: offset,
      notes: site.notes,
    },
    period: { from: q.from, to: q.to, localDatesOn: `the data clock, UTC${offset}, no daylight saving` },
    conventions: {
      dates: `ISO 8601; evening dates are local dates on the data clock (UTC${offset}); times carry their offset`,
      label: "final label: an analyst's override where there is one, else the automatic label",
      source: "automatic = the classifier's label; override = set by an analyst with the note given",
      halfHourEvening: "a half-hour belongs to the evening of the local date of its start minus 12 hours (evenings run noon to noon)",
      missing: "empty cell",
      formulaCells: "text cells that would start with = + - @, tab or carriage return are prefixed with ' (OWASP CSV injection guidance)",
    },
    ruleSets: ruleSets.map((r) => ({
      id: r.id,
      version: r.version,
      name: r.name,
      author: r.author_name ?? r.author_id,
      comment: r.comment,
      createdAt: isoWithOffset(r.created_at, 0),
      activeOnSite: r.id === site.active_rule_set_id,
      eveningsLabelled: Number(used.find((u) => u.rule_set_id === r.id)?.n ?? 0),
      definition: jsonColumn(r.definition),
    })),
    sourceFiles: sources.map((s) => ({
      importId: Number(s.id),
      name: s.original_name,
      sha256: s.sha256,
      sizeBytes: Number(s.size_bytes),
      status: s.status,
      importedAt: isoWithOffset(s.created_at, 0),
      firstPeriodStart: s.first_start_utc ? isoWithOffset(s.first_start_utc, site.utc_offset_hours) : null,
      lastPeriodStart: s.last_start_utc ? isoWithOffset(s.last_start_utc, site.utc_offset_hours) : null,
    })),
    files,
  };
}

const slug = (s: string) =>
  s
    .normalize("NFKD")
    .replace(/[^A-Za-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .toLowerCase()
    .slice(0, 60) || "site";

/** File name of the export zip, e.g. gloaming-hollow-pine-2020-01-01_2020-12-31.zip. */
export function exportFileName(site: ExportSite, q: ExportQuery): string {
  return `gloaming-${slug(site.name)}-${q.from}_${q.to}.zip`;
}

/**
 * The export of one site and period as a zip stream. The caller has checked the role; errors
 * while streaming destroy the stream (the download fails rather than ending short but valid).
 */
export async function exportZip(user: SessionUser, site: ExportSite, q: ExportQuery): Promise<Readable> {
  const dir = exportFileName(site, q).replace(/\.zip$/, "");
  const exportedAt = new Date();
  const mtime = exportedAt;
  const tracers: Array<{ slot: number; name: string }> = await db("site_series").where({ site_id: site.id }).orderBy("slot").select("slot", "name");
  const zip = new ZipFile();
  const files: FileStats[] = [];
  const labels = new Map<string, string>();
  const output = zip.outputStream as Readable;
  const fail = (err: unknown) => output.destroy(err instanceof Error ? err : new Error(String(err)));

  const streams: Readable[] = [];
  const add = (name: string, columns: string[], body: AsyncGenerator<string>) => {
    const s = Readable.from(counted(name, columns, body, files), { objectMode: false });
    s.on("error", fail);
    zip.addReadStream(s, `${dir}/${name}`, { mtime });
    streams.push(s);
  };
  add("evenings.csv", [...EVENING_COLUMNS], eveningChunks(site, q, labels));
  if (q.halfHours) {
    const columns = ["timestamp_start", ...HALF_HOUR_MEASURES.map(([, h]) => h), ...tracers.map((t) => t.name), "evening_date", "evening_label"];
    add("half-hours.csv", columns, halfHourChunks(site, q, tracers, labels));
  }
  const last = streams[streams.length - 1];
  if (last) {
    last.once("end", () => {
      provenance(site, q, user, files, exportedAt)
        .then((p) => {
          zip.addBuffer(Buffer.from(`${JSON.stringify(p, null, 2)}\n`, "utf8"), `${dir}/provenance.json`, { mtime });
          zip.end();
        })
        .catch(fail);
    });
  }
  return output;
}
