import Papa from "papaparse";
import {
  isKnownVariable,
  isTimestampRole,
  looksLikeUnitsRow,
  recognizeColumns,
  resolveColumns,
  type ColumnGuess,
} from "@/lib/series/recognize";
import { VARIABLES } from "@/lib/series/types";
import type { ImportTemplate } from "@/features/imports/schemas";

/*
 * The browser's look at the head of a file before anything is sent: papaparse on the first
 * bytes, the header found the way the server's reader finds it, and a first mapping from the
 * engine's recognition (or the site's saved template). Pure, so tests run it in node.
 */

/** Bytes of the file read for the preview. */
export const PREVIEW_BYTES = 64 * 1024;

export interface Preview {
  delimiter: string;
  /** 1-based file line of the header. */
  headerLine: number;
  headers: string[];
  unitsRow: string[] | null;
  /** First data rows, as text. */
  rows: string[][];
  guesses: ColumnGuess[];
  /** A problem to show instead of a mapping (e.g. no header with a timestamp). */
  problem: string | null;
}

/** One column's line in the mapping editor: target "" leaves the column out. */
export interface MappingRow {
  header: string;
  target: string;
  unit: string;
}

const HEADER_SEARCH_LINES = 10;

/**
 * The candidate that splits every one of the first lines into the most fields; "" lets
 * papaparse guess. Short heads (two lines, a trailing newline) defeat papaparse's own guess.
 */
function guessDelimiter(text: string): string {
  const lines = text.split(/\r\n|\n|\r/).filter((l) => l.trim() !== "").slice(0, 5);
  let best = "";
  let bestCount = 0;
  for (const d of [",", ";", "\t", "|"]) {
    const counts = lines.map((l) => l.split(d).length - 1);
    const least = counts.length > 0 ? Math.min(...counts) : 0;
    if (least > bestCount) [best, bestCount] = [d, least];
  }
  return best;
}

/** Parses the head of a file (text of its first bytes; a cut last line is dropped). */
export function previewFile(text: string, truncated: boolean): Preview {
  let body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (truncated) {
    const cut = Math.max(body.lastIndexOf("\n"), body.lastIndexOf("\r"));
    if (cut > 0) body = body.slice(0, cut);
  }
  const empty: Preview = { delimiter: "", headerLine: 0, headers: [], unitsRow: null, rows: [], guesses: [], problem: null };
  if (body.trim() === "") return { ...empty, problem: "The file is empty." };
  if (/[\u0000-\u0008\u000e-\u001f]/.test(body.slice(0, 4096))) {
    return { ...empty, problem: "This does not look like a text file (it contains binary bytes). Export the data as CSV." };
  }
  const parsed = Papa.parse<string[]>(body, { header: false, dynamicTyping: false, skipEmptyLines: false, preview: 60, delimiter: guessDelimiter(body) });
  const lines = parsed.data;
  const delimiter = parsed.meta.delimiter;
  let headerAt = -1;
  for (let i = 0; i < Math.min(HEADER_SEARCH_LINES, lines.length); i++) {
    const plan = resolveColumns(recognizeColumns((lines[i] ?? []).map((c) => c.trim())));
    if (plan.timestamp) {
      headerAt = i;
      break;
    }
  }
  if (headerAt < 0) {
    const first = (lines[0] ?? []).map((c) => c.trim());
    return {
      ...empty,
      delimiter,
      headerLine: 1,
      headers: first,
      rows: lines.slice(1, 11),
      guesses: recognizeColumns(first),
      problem: `No timestamp column found in the first ${Math.min(HEADER_SEARCH_LINES, lines.length)} lines. Name one TIMESTAMP_START, TIMESTAMP_END or TIMESTAMP, or map a column to it below.`,
    };
  }
  const headers = (lines[headerAt] ?? []).map((c) => c.trim());
  let unitsRow: string[] | null = null;
  let dataAt = headerAt + 1;
  const next = lines[dataAt];
  if (next && looksLikeUnitsRow(next)) {
    unitsRow = next.map((c) => c.trim());
    dataAt++;
  }
  const rows = lines.slice(dataAt, dataAt + 10).filter((r) => r.some((c) => c.trim() !== ""));
  return { delimiter, headerLine: headerAt + 1, headers, unitsRow, rows, guesses: recognizeColumns(headers, unitsRow ?? undefined), problem: null };
}

/**
 * The editor's first mapping: the template's entry where the site saved one for this header,
 * else what the server would read without a mapping (measured over gap-filled columns, the
 * others left out).
 */
export function initialMapping(preview: Preview, template: ImportTemplate | null): MappingRow[] {
  const plan = resolveColumns(preview.guesses);
  const chosen = new Map<number, { target: string; unit: string | null }>();
  for (const c of plan.columns) chosen.set(c.index, { target: c.name, unit: c.unit });
  const tsIndex = new Set<number>();
  const t = plan.timestamp;
  if (t) {
    if (t.kind === "pair") [t.start, t.end].forEach((i) => tsIndex.add(i));
    else if (t.kind === "start") tsIndex.add(t.start);
    else if (t.kind === "end") tsIndex.add(t.end);
    else if (t.kind === "single") tsIndex.add(t.index);
    else [t.date, t.time].forEach((i) => tsIndex.add(i));
  }
  return preview.guesses.map((g) => {
    const saved = template?.columns?.[g.header];
    if (saved !== undefined) return { header: g.header, target: saved?.variable ?? "", unit: saved?.unit ?? "" };
    if (tsIndex.has(g.index)) return { header: g.header, target: g.variable ?? "", unit: "" };
    const c = chosen.get(g.index);
    return { header: g.header, target: c?.target ?? "", unit: c?.unit ?? "" };
  });
}

/** The mapping to send: every column named explicitly, "" as left out. */
export function mappingFromRows(rows: readonly MappingRow[]): Record<string, { variable: string; unit?: string } | null> {
  const out: Record<string, { variable: string; unit?: string } | null> = {};
  for (const r of rows) {
    if (r.header === "") continue;
    const target = r.target.trim();
    out[r.header] = target === "" ? null : r.unit.trim() ? { variable: target, unit: r.unit.trim() } : { variable: target };
  }
  return out;
}

/** Problems of a mapping that the server would refuse: no timestamp, nothing to read, a target used twice. */
export function mappingProblems(rows: readonly MappingRow[]): string[] {
  const problems: string[] = [];
  const seen = new Map<string, string>();
  let timestamp = false;
  let values = 0;
  for (const r of rows) {
    const t = r.target.trim();
    if (!t) continue;
    if (isTimestampRole(t)) timestamp = true;
    else values++;
    const prev = seen.get(t.toUpperCase());
    if (prev !== undefined) problems.push(`"${prev}" and "${r.header}" are both mapped to ${t}.`);
    seen.set(t.toUpperCase(), r.header);
    if (!isTimestampRole(t) && !isKnownVariable(t) && !/^[A-Za-z][A-Za-z0-9_]*$/.test(t)) problems.push(`"${t}" is not a usable name (letters, digits and _).`);
  }
  if (!timestamp) problems.push("Map one column to a timestamp (TIMESTAMP_START, TIMESTAMP_END or TIMESTAMP).");
  if (values === 0) problems.push("Map at least one column to a variable.");
  return problems;
}

/** Choices of the target select, in groups. */
export const TARGET_OPTIONS: { group: string; options: { value: string; label: string }[] }[] = [
  {
    group: "Timestamp",
    options: [
      { value: "TIMESTAMP_START", label: "TIMESTAMP_START - period start" },
      { value: "TIMESTAMP_END", label: "TIMESTAMP_END - period end" },
      { value: "TIMESTAMP", label: "TIMESTAMP - one stamp per row" },
      { value: "DATE", label: "DATE - date part" },
      { value: "TIME", label: "TIME - clock time part" },
    ],
  },
  {
    group: "Variables",
    options: Object.entries(VARIABLES).map(([k, v]) => ({ value: k, label: `${k} - ${v.description}` })),
  },
];

/** Canonical unit of a target, for the unit field's placeholder. */
export function canonicalUnitOf(target: string): string {
  return isKnownVariable(target) ? VARIABLES[target].unit : "";
}
