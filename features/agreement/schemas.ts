import { z } from "zod";
import type { LabelKey } from "@/lib/ui/label-badge";

const blank = (v: unknown) => (v === "" || v === null ? undefined : v);
const isoDate = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, "Give the date as YYYY-MM-DD.");
const label = z.enum(["local", "stagnant", "advective", "unclassified"]);

/** Query of the agreement panel: a site, an optional period and an optional cell to list. */
export const agreementQuerySchema = z.object({
  site: z.coerce.number().int().positive(),
  from: z.preprocess(blank, isoDate.optional()),
  to: z.preprocess(blank, isoDate.optional()),
  auto: z.preprocess(blank, label.optional()),
  final: z.preprocess(blank, label.optional()),
});
export type AgreementQuery = z.infer<typeof agreementQuerySchema>;

export interface AgreementReport {
  siteId: number;
  from: string | null;
  to: string | null;
  labels: LabelKey[];
  /** counts[auto][final], in `labels` order */
  counts: number[][];
  n: number;
  overrides: number;
  observed: number;
  expected: number;
  kappa: number | null;
}
