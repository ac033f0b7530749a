import { z } from "zod";
import type { EveningMetrics } from "@/lib/classify/evenings";

/*
 * Inputs and answer shapes of the review feature (calendar, evening page, overrides, queue,
 * regime chart). One schema per input, shared by the route handlers and the client.
 */

export const LABELS = ["local", "stagnant", "advective", "unclassified"] as const;
export type Label = (typeof LABELS)[number];

export const labelSchema = z.enum(LABELS, {
  error: "The label must be one of local, stagnant, advective, unclassified.",
});

const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;

/** A calendar date YYYY-MM-DD that exists (2025-02-30 does not). */
export const dateSchema = z
  .string({ error: "Give the date as YYYY-MM-DD." })
  .regex(ISO_DATE, "Give the date as YYYY-MM-DD.")
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
  }, "That date does not exist.");

/** Longest period one request may ask for: two years and a little, so a site-year always fits. */
export const MAX_RANGE_DAYS = 800;

export const rangeSchema = z
  .object({ from: dateSchema, to: dateSchema })
  .refine((r) => r.from <= r.to, { path: ["to"], message: "`to` must not be before `from`." })
  .refine((r) => daysBetween(r.from, r.to) <= MAX_RANGE_DAYS, {
    path: ["to"],
    message: `Ask for at most ${MAX_RANGE_DAYS} days at a time.`,
  });
export type DateRange = z.infer<typeof rangeSchema>;

export function daysBetween(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000);
}

const versionSchema = z.coerce
  .number({ error: "Send the version of the evening you looked at." })
  .int("The version is a whole number.")
  .positive("The version is a whole number.");

export const noteSchema = z
  .string({ error: "Write a note: why is the label different?" })
  .trim()
  .min(1, "Write a note: why is the label different?")
  .max(2000, "Keep the note to 2000 characters or fewer.");

/** POST /api/evenings/:id/overrides */
export const overrideInputSchema = z.object({ label: labelSchema, note: noteSchema, version: versionSchema });
export type OverrideInput = z.infer<typeof overrideInputSchema>;

/** POST /api/evenings/:id/revert (lead) */
export const revertInputSchema = z.object({
  version: versionSchema,
  note: z.string().trim().max(2000, "Keep the note to 2000 characters or fewer.").optional(),
});
export type RevertInput = z.infer<typeof revertInputSchema>;

/** POST /api/evenings/:id/reviewed */
export const reviewedInputSchema = z.object({ version: versionSchema });
export type ReviewedInput = z.infer<typeof reviewedInputSchema>;

/** Parses an id from a route segment. */
export const idSchema = z.coerce.number().int().positive();

/** One evening as GET /api/sites/:id/evenings lists it (the shape scripts rely on). */
export type EveningSummary = {
  id: number;
  date: string;
  label: Label;
  autoLabel: Label;
  source: "auto" | "override";
  sunsetUtc: string | null;
  civilDuskUtc: string | null;
  rule: string | null;
  reasons: string[];
  metrics: EveningMetrics;
  reviewed: boolean;
  version: number;
};

/** One entry of an evening's append-only history. */
export type HistoryEntry = {
  id: number;
  kind: "auto" | "override" | "revert" | "reviewed";
  fromLabel: Label | null;
  toLabel: Label | null;
  note: string | null;
  user: string | null;
  ruleSetVersion: number | null;
  at: string;
};

/** A metric against one threshold of the rule set that labelled the evening. */
export type ThresholdRow = {
  name: string;
  metric: string;
  unit: string;
  op: "below" | "above";
  /** the threshold in force for this evening (resolved percentiles included); null when unknown */
  threshold: number | null;
  value: number | null;
  /** signed distance to the threshold; positive = the condition holds */
  margin: number | null;
  description: string;
  /** rule ids that use this threshold */
  rules: string[];
  /** part of the rule that decided the label */
  deciding: boolean;
};

/** One plotted series of the evening window: values aligned with EveningSeries.startMs. */
export type SeriesColumn = {
  key: string;
  name: string;
  unit: string;
  /** wind direction is circular: drawn as points, never joined across 360/0 */
  circular?: boolean;
  values: Array<number | null>;
};

export type EveningSeries = {
  /** UTC epoch ms of each period's middle */
  timeMs: number[];
  periodMinutes: number;
  columns: SeriesColumn[];
};

export type WindowSpan = { name: "afternoon" | "transition" | "evening"; startMs: number; endMs: number };

export type EveningDetail = {
  evening: EveningSummary & {
    siteId: number;
    margins: Record<string, number>;
    ruleSetVersion: number | null;
    ruleSetName: string | null;
    computedAt: string;
    overrideNote: string | null;
    reviewedBy: string | null;
    reviewedAt: string | null;
  };
  /** the sunset the window is centred on (evening of a polar day/night: 18:00 local) */
  centreMs: number;
  windows: WindowSpan[];
  thresholds: ThresholdRow[];
  ruleDescription: string | null;
  history: HistoryEntry[];
  series: EveningSeries;
  neighbours: { previous: { id: number; date: string } | null; next: { id: number; date: string } | null };
};

/** Why an evening is in the queue, ranked by need. */
export type QueueItem = {
  id: number;
  date: string;
  label: Label;
  autoLabel: Label;
  source: "auto" | "override";
  reviewed: boolean;
  version: number;
  rule: string | null;
  /** smaller = needs a person sooner */
  need: number;
  why: string;
  /** anomalies of the evening and whether its night had fluxes under weak turbulence */
  anomalyCount?: number;
  weakTurbulence?: boolean;
};

/** One point of the regime chart. */
export type RegimePoint = { id: number; date: string; label: Label; ws: number; sigmaW: number };

/** The 409 answer when someone else changed the evening first. */
export type ConflictBody = {
  error: {
    code: "conflict";
    message: string;
    current: { label: Label; source: "auto" | "override"; version: number; by: string | null };
  };
};
