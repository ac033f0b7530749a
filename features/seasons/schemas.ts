import { z } from "zod";
import type { LabelKey } from "@/lib/ui/label-badge";
import type { Category, CustomSeason, Hemisphere, SeasonScheme } from "@/features/seasons/seasons";

const isoDate = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Use a date as YYYY-MM-DD.")
  .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)) && new Date(`${s}T00:00:00Z`).toISOString().startsWith(s), "Not a calendar date.");

const monthDay = z
  .string()
  .regex(/^(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/, "Use a day of the year as MM-DD, e.g. 04-15.");

const blank = (v: unknown) => (v === "" || v === null ? undefined : v);

/** Query of the seasons page and of GET /api/seasons (strings from a URL). */
export const seasonQuerySchema = z
  .object({
    sites: z.preprocess(
      (v) => (typeof v === "string" ? v.split(",").map((s) => s.trim()).filter(Boolean) : v),
      z
        .array(z.coerce.number().int().positive("Site ids are positive whole numbers."))
        .min(1, "Choose at least one site.")
        .max(20, "Choose at most 20 sites."),
    ),
    from: z.preprocess(blank, isoDate.optional()),
    to: z.preprocess(blank, isoDate.optional()),
    scheme: z.preprocess(blank, z.enum(["meteorological", "month", "custom"]).default("meteorological")),
    labels: z.preprocess(blank, z.enum(["final", "auto"]).default("final")),
    seasonName: z.preprocess(blank, z.string().trim().min(1).max(40).default("Growing season")),
    seasonStart: z.preprocess(blank, monthDay.default("04-01")),
    seasonEnd: z.preprocess(blank, monthDay.default("09-30")),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ["to"], message: "The end date is before the start date." });

export type SeasonQuery = z.infer<typeof seasonQuerySchema>;

export type Counts = Record<LabelKey, number>;

export interface SeasonCell {
  /** null: all chosen sites together */
  siteId: number | null;
  /** null: every year of the period */
  year: number | null;
  category: string;
  counts: Counts;
  total: number;
}

export interface SeasonTest {
  /** the labels tested against the seasons (unclassified evenings say more about data than weather) */
  labels: LabelKey[];
  statistic: number;
  df: number;
  pValue: number | null;
  n: number;
  smallExpectedShare: number;
}

export interface SeasonReport {
  from: string | null;
  to: string | null;
  labels: "final" | "auto";
  scheme: SeasonScheme;
  custom: CustomSeason | null;
  sites: Array<{ id: number; name: string; latitude: number; hemisphere: Hemisphere }>;
  categories: Category[];
  years: number[];
  /** per site (and for all sites together when more than one), per year and for all years */
  cells: SeasonCell[];
  test: SeasonTest | null;
}
