import { z } from "zod";
import { ANOMALY_KINDS } from "@/lib/anomalies/detect";
import { SEASONS } from "@/lib/ustar/seasons";

/** Shared by the anomalies page, its filters and the JSON route. */

const localDate = z.iso.date({ message: "Use a date as YYYY-MM-DD." });
const LABELS = ["local", "stagnant", "advective", "unclassified"] as const;

const optional = <T extends z.ZodType>(schema: T) =>
  z.preprocess((v) => (v === "" || v === null ? undefined : v), schema.optional());

/** `GET /api/sites/:siteId/anomalies?from=&to=`: local dates, both optional and inclusive. */
export const anomalyRangeSchema = z
  .object({ from: optional(localDate), to: optional(localDate) })
  .refine((r) => !r.from || !r.to || r.from <= r.to, { message: "from must not be after to", path: ["to"] });

/** Filters of the anomalies page (search params). */
export const anomalyFiltersSchema = z.object({
  series: optional(z.string().max(40)),
  kind: optional(z.enum(ANOMALY_KINDS)),
  label: optional(z.enum(LABELS)),
  season: optional(z.enum(SEASONS)),
  page: optional(z.coerce.number().int().min(1).max(10_000)),
});
export type AnomalyFiltersInput = z.infer<typeof anomalyFiltersSchema>;

/** Payload of the anomalies job. */
export const anomalyJobPayloadSchema = z.object({
  from: localDate.nullable().default(null),
  to: localDate.nullable().default(null),
});

export const KIND_NAMES: Record<(typeof ANOMALY_KINDS)[number], string> = {
  "rise-after-sunset": "Rise after sunset",
  "rise-before-sunset": "Rise before sunset",
  drop: "Drop",
  spike: "Spike",
};

export const SEASON_NAMES: Record<(typeof SEASONS)[number], string> = {
  winter: "Winter",
  spring: "Spring",
  summer: "Summer",
  autumn: "Autumn",
};
