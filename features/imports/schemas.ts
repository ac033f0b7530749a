import { z } from "zod";

/*
 * Inputs of the import feature, shared by the page, the server actions and the route
 * handlers: the column mapping (as saved in the site's template and sent with an upload), the
 * overlap choice, and the recompute period. Also the client-side shapes of imports and jobs.
 */

/** Column targets a mapping may name besides tracer names. */
export const TIMESTAMP_TARGETS = ["TIMESTAMP_START", "TIMESTAMP_END", "TIMESTAMP", "DATE", "TIME"] as const;

const target = z
  .string()
  .trim()
  .min(1, "Name a variable.")
  .max(40, "Keep variable names to 40 characters.")
  .regex(/^[A-Za-z][A-Za-z0-9_]*$/, "Variable names are letters, digits and _ (e.g. O3 or TRACER_1).");

export const mappingEntrySchema = z.union([
  z.null(),
  z.object({ variable: target, unit: z.string().trim().max(32).optional() }),
]);

export const overlapChoiceSchema = z.enum(["cancel", "replace", "keep"]);
export type OverlapChoice = z.infer<typeof overlapChoiceSchema>;

/** "ask" (the page) stops before writing and waits for a choice; absent means "cancel" (the API default). */
export const overlapSettingSchema = z.enum(["ask", "cancel", "replace", "keep"]);

/**
 * How to read a file. Every field is optional: what is not given is recognised from the file
 * (columns) or taken from the site (UTC offset).
 */
export const importSettingsSchema = z.object({
  /** Header text -> target; null leaves a column out. */
  columns: z.record(z.string().max(200), mappingEntrySchema).optional(),
  missingCodes: z.array(z.string().max(20)).max(20).optional(),
  timestampConvention: z.enum(["start", "end"]).optional(),
  utcOffsetHours: z
    .number()
    .min(-14, "The UTC offset must be between -14 and +14 h.")
    .max(14, "The UTC offset must be between -14 and +14 h.")
    .refine((v) => Number.isInteger(v * 4), "The UTC offset must be a whole number of quarter hours.")
    .optional(),
  /** What to do where the file overlaps data already stored; absent means "cancel". */
  overlap: overlapSettingSchema.optional(),
  /** Save columns, codes and convention as the site's template. */
  saveTemplate: z.boolean().optional(),
});
export type ImportSettings = z.infer<typeof importSettingsSchema>;

/** The part of the settings that is saved per site and offered next time. */
export const templateSchema = importSettingsSchema.pick({
  columns: true,
  missingCodes: true,
  timestampConvention: true,
  utcOffsetHours: true,
});
export type ImportTemplate = z.infer<typeof templateSchema>;

/** Parses the mapping JSON of a multipart upload; a blank field means no mapping. */
export function parseSettingsJson(text: string | null | undefined): ImportSettings {
  if (text == null || text.trim() === "") return {};
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch {
    throw new z.ZodError([{ code: "custom", path: ["mapping"], message: "The mapping is not valid JSON.", input: text }]);
  }
  return importSettingsSchema.parse(raw);
}

export const resolveOverlapSchema = z.object({
  importId: z.coerce.number().int().positive(),
  choice: overlapChoiceSchema,
});

const isoDate = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date as YYYY-MM-DD.")
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), "Not a calendar date.");

export const recomputeSchema = z
  .object({
    siteId: z.coerce.number().int().positive(),
    from: isoDate,
    to: isoDate,
  })
  .refine((v) => v.from <= v.to, { message: "The period ends before it starts.", path: ["to"] })
  .refine((v) => Date.parse(v.to) - Date.parse(v.from) <= 40 * 366 * 86_400_000, {
    message: "Choose a period of at most 40 years.",
    path: ["to"],
  });

export type ImportStatus = "pending" | "queued" | "running" | "landed" | "failed" | "refused" | "deleted" | "purged";
export type JobStatus = "queued" | "running" | "done" | "failed" | "cancelled";

/** Per-column line of the validation report. */
export interface ColumnReport {
  header: string;
  variable: string;
  unit: string | null;
  read: number;
  missing: number;
  notNumeric: number;
  outOfRange: number;
  converted: string | null;
}

export interface RejectedRow {
  row: number;
  column: string;
  value: string;
  reason: string;
}

/** The validation report stored with an import (imports.report) and shown on the page. */
export interface ImportReport {
  rows: number;
  lines: number;
  periodMinutes: number;
  firstStartUtc: string | null;
  lastStartUtc: string | null;
  delimiter: string;
  timestamp: { columns: string[]; convention: string; clockUtcOffsetHours: number };
  columns: ColumnReport[];
  ignored: { header: string; reason: string }[];
  duplicates: number;
  outOfOrder: number;
  irregularSteps: number;
  gaps: { count: number; missingPeriods: number };
  warnings: string[];
  /** First rejected cells (line numbers are 1-based lines of the file). */
  rejectedSample: RejectedRow[];
  rejectedTotal: number;
  /** Storage key of the full rejected list as CSV, when there is any. */
  rejectedKey: string | null;
  /** Set when the file was refused before any write. */
  refusal: { row: number | null; message: string } | null;
  overlap: { existingRows: number; from: string; to: string } | null;
  written: { rows: number; choice: OverlapChoice | null } | null;
  evenings: { computed: number; from: string; to: string } | null;
}

/** An import as the page and the API show it. */
export interface ImportSummary {
  id: number;
  siteId: number;
  originalName: string;
  sizeBytes: number;
  sha256: string;
  status: ImportStatus;
  jobId: number | null;
  overlapChoice: OverlapChoice | null;
  firstStartUtc: string | null;
  lastStartUtc: string | null;
  rowsWritten: number;
  createdAt: string;
  finishedAt: string | null;
  createdBy: string | null;
  report: ImportReport | null;
}

/** A job as GET /api/jobs/:id answers. */
export interface JobView {
  id: number;
  kind: string;
  status: JobStatus;
  phase: string;
  progress: { done: number; total: number; unit: string };
  message: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  result: unknown;
  import: ImportSummary | null;
}
