import { z } from "zod";
import type { LabelKey } from "@/lib/ui/label-badge";

const isoDate = z
  .string({ error: "Give the date as YYYY-MM-DD." })
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Give the date as YYYY-MM-DD.")
  .refine((s) => {
    const t = Date.parse(`${s}T00:00:00Z`);
    return !Number.isNaN(t) && new Date(t).toISOString().startsWith(s);
  }, "Not a calendar date.");

const id = z.coerce.number({ error: "Choose one." }).int().positive("Choose one.");

/**
 * A new version of a group's rules. `definition` is the whole rule set (lib/classify RuleSet
 * JSON); it is validated with parseRuleSet on the server, so its own issues name their paths.
 */
export const newVersionSchema = z.object({
  groupId: id,
  basedOnId: id.optional(),
  name: z.string().trim().min(1, "Give the version a name.").max(120),
  comment: z.string().trim().min(3, "Say what changed and why (a few words at least).").max(2000),
  definition: z.unknown(),
});
export type NewVersionInput = z.infer<typeof newVersionSchema>;

/** A what-if run: the labels a definition would give over a site and period, without saving. */
export const previewSchema = z
  .object({
    siteId: id,
    from: isoDate,
    to: isoDate,
    definition: z.unknown(),
  })
  .refine((q) => q.from <= q.to, { path: ["to"], message: "The end date is before the start date." })
  .refine((q) => Date.parse(q.to) - Date.parse(q.from) <= 366 * 5 * 86_400_000, {
    path: ["to"],
    message: "Preview at most five years at a time.",
  });
export type PreviewInput = z.infer<typeof previewSchema>;

export const activateSchema = z.object({ siteId: id });

export type Counts = Record<LabelKey, number>;

export interface PreviewChange {
  date: string;
  /** the stored evening, when there is one */
  eveningId: number | null;
  before: LabelKey | null;
  after: LabelKey;
  /** the final label when an analyst's override sits on top (it stays) */
  override: LabelKey | null;
  rule: string | null;
}

export interface PreviewResult {
  siteId: number;
  from: string;
  to: string;
  evenings: number;
  before: Counts;
  after: Counts;
  /** evenings whose automatic label would change, by date */
  changes: PreviewChange[];
  /** how many of the changes sit under an override (the final label would not change) */
  changesUnderOverride: number;
}

export interface RuleSetSummary {
  id: number;
  version: number;
  name: string;
  comment: string | null;
  author: string | null;
  createdAt: string;
  /** evenings labelled with this version (immutable once > 0 or active) */
  eveningsLabelled: number;
  activeOn: Array<{ id: number; name: string }>;
  definition: unknown;
}
