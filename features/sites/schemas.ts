import { z } from "zod";

/*
 * One schema for the site form, its server action and the route handlers. Values arrive as
 * FormData strings or JSON numbers. A plain z.coerce.number() would turn an empty field into 0,
 * so numbers are coerced by hand: empty means "not given", "9,1" is read as 9.1.
 */

const blankToUndefined = (v: unknown) =>
  v === "" || v === null || (typeof v === "string" && v.trim() === "") ? undefined : v;

function number(label: string, opts: { min?: number; max?: number; minExclusive?: boolean; unit?: string }) {
  const unit = opts.unit === undefined ? "" : opts.unit === "°" ? "°" : ` ${opts.unit}`;
  let n = z.number({
    error: (iss) => (iss.input === undefined ? `Enter the ${label}.` : `The ${label} must be a number.`),
  });
  if (opts.min !== undefined) {
    n = opts.minExclusive
      ? n.gt(opts.min, `The ${label} must be greater than ${opts.min}${unit}.`)
      : n.gte(opts.min, `The ${label} must be at least ${opts.min}${unit}.`);
  }
  if (opts.max !== undefined) n = n.lte(opts.max, `The ${label} must be at most ${opts.max}${unit}.`);
  return n;
}

/** Strings from a form become numbers; NaN (e.g. "abc") stays invalid with a readable message. */
function coerced<T extends z.ZodType>(schema: T) {
  return z.preprocess((v) => {
    const b = blankToUndefined(v);
    if (typeof b === "string") {
      const n = Number(b.trim().replace(",", "."));
      return Number.isFinite(n) ? n : b;
    }
    return b;
  }, schema);
}

export const siteFields = z.object({
  name: z
    .string({ error: "Enter a name for the site." })
    .trim()
    .min(1, "Enter a name for the site.")
    .max(120, "Keep the name to 120 characters or fewer."),
  latitude: coerced(number("latitude", { min: -90, max: 90, unit: "°" })),
  longitude: coerced(number("longitude", { min: -180, max: 180, unit: "°" })),
  elevationM: coerced(number("elevation", { min: -450, max: 9000, unit: "m" })),
  measurementHeightM: coerced(
    number("measurement height", { min: 0, minExclusive: true, max: 500, unit: "m" }),
  ),
  canopyHeightM: coerced(number("canopy height", { min: 0, max: 150, unit: "m" })),
  displacementHeightM: coerced(number("displacement height", { min: 0, max: 150, unit: "m" }).optional()),
  utcOffsetHours: coerced(
    number("UTC offset", { min: -12, max: 14, unit: "h" }).refine((v) => Number.isInteger(v * 4), {
      message: "The UTC offset must be a whole number of quarter hours (e.g. 5.5 or 5.75).",
    }),
  ),
  notes: z.preprocess(
    blankToUndefined,
    z.string().trim().max(4000, "Keep the notes to 4000 characters or fewer.").optional(),
  ),
});

/** A site as entered: heights in metres, UTC offset of the data logger's clock in hours. */
export const siteInputSchema = siteFields
  .refine((s) => s.canopyHeightM < s.measurementHeightM, {
    path: ["canopyHeightM"],
    message: "The canopy height must be below the measurement height.",
    // Checked as soon as both heights are valid, even while other fields still have errors.
    when: (p) => heightsValid(p.value, "canopyHeightM"),
  })
  .refine((s) => s.displacementHeightM === undefined || s.displacementHeightM < s.measurementHeightM, {
    path: ["displacementHeightM"],
    message: "The displacement height must be below the measurement height.",
    when: (p) => heightsValid(p.value, "displacementHeightM"),
  });

const heightPairs = {
  canopyHeightM: siteFields.pick({ measurementHeightM: true, canopyHeightM: true }),
  displacementHeightM: siteFields.pick({ measurementHeightM: true, displacementHeightM: true }),
};

function heightsValid(value: unknown, other: keyof typeof heightPairs): boolean {
  return heightPairs[other].safeParse(value).success;
}

export type SiteInput = z.infer<typeof siteInputSchema>;
export type SiteField = keyof SiteInput;

/** A site as the client sees it (API answers and server props alike). */
export type Site = {
  id: number;
  groupId: number;
  name: string;
  latitude: number;
  longitude: number;
  elevationM: number;
  measurementHeightM: number;
  canopyHeightM: number;
  displacementHeightM: number | null;
  utcOffsetHours: number;
  notes: string | null;
  createdAt: string;
  updatedAt: string;
};

/** What a site's stored data covers; null on the summary while nothing has been imported. */
export type SiteCoverage = {
  /** start of the first stored half-hour, ISO 8601 UTC */
  firstUtc: string;
  /** start of the last stored half-hour, ISO 8601 UTC */
  lastUtc: string;
  /** half-hours with at least one measured value */
  presentHalfHours: number;
  /** half-hours from the first to the last, both included */
  spanHalfHours: number;
  /** presentHalfHours / spanHalfHours, 0..1 */
  share: number;
  /** evenings stored (classified or not) */
  evenings: number;
};

export type LabelCounts = Record<"local" | "stagnant" | "advective" | "unclassified", number>;

/** Per-site summary shown on the list; coverage and labelCounts are null until data and evenings exist. */
export type SiteSummary = Site & {
  coverage: SiteCoverage | null;
  /** evenings by their final (reviewed) label */
  labelCounts: LabelCounts | null;
};

/** What a site action returns for expected problems; values keep what the person typed. */
export type SiteFormState = {
  ok: boolean;
  message?: string;
  fieldErrors?: Partial<Record<SiteField, string[]>>;
  values?: Partial<Record<SiteField, string>>;
};

/** Parses a group id from a query string or form value. */
export const groupIdSchema = z.coerce
  .number({ error: "groupId must be a number." })
  .int("groupId must be a whole number.")
  .positive("groupId must be positive.");

/** Parses a site id from a route segment. */
export const siteIdSchema = z.coerce.number().int().positive();

/** Formats a UTC offset in hours as "UTC+05:45". */
export function formatUtcOffset(hours: number): string {
  const sign = hours < 0 ? "−" : "+";
  const abs = Math.abs(hours);
  const h = Math.floor(abs);
  const m = Math.round((abs - h) * 60);
  return `UTC${sign}${String(h).padStart(2, "0")}:${String(m).padStart(2, "0")}`;
}
