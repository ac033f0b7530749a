import { z } from "zod";

/**
 * The evening rule set: windows relative to sunset, named thresholds on evening metrics, and an
 * ordered list of rules. The first rule whose conditions all hold decides the label.
 * Thresholds are screening defaults; they are site-dependent.
 */

export const METRIC_NAMES = [
  "sigmaWAfternoon",
  "sigmaWTransition",
  "sigmaWEvening",
  "sigmaWDecay",
  "ustarAfternoon",
  "ustarEvening",
  "ustarDecay",
  "windSpeedEvening",
  "wdShiftDeg",
  "wdShiftAbsDeg",
  "sigmaThetaEvening",
  "zetaEvening",
  "hZeroCrossingMinutes",
  "coolingRateKPerH",
  "dewPointChangeK",
] as const;
export type MetricName = (typeof METRIC_NAMES)[number];

const windowSchema = z
  .object({
    /** minutes relative to sunset, inclusive */
    startMinutes: z.number().int().min(-720).max(720),
    /** minutes relative to sunset, exclusive */
    endMinutes: z.number().int().min(-720).max(720),
  })
  .refine((w) => w.endMinutes > w.startMinutes, { message: "endMinutes must be after startMinutes" });

const thresholdSchema = z.discriminatedUnion("kind", [
  z.object({
    kind: z.literal("absolute"),
    metric: z.enum(METRIC_NAMES),
    /** "below": the condition holds when metric < value; "above": metric > value */
    op: z.enum(["below", "above"]),
    value: z.number(),
    description: z.string().optional(),
  }),
  z.object({
    kind: z.literal("percentile"),
    metric: z.enum(METRIC_NAMES),
    op: z.enum(["below", "above"]),
    /** percentile 0..100 of the metric over the site's own evenings in the table */
    percentile: z.number().min(0).max(100),
    /** used when fewer than minEvenings evenings have the metric */
    fallback: z.number(),
    minEvenings: z.number().int().min(1).default(30),
    description: z.string().optional(),
  }),
]);

const ruleSchema = z.object({
  id: z.string().regex(/^[a-z][a-z0-9-]*$/, "rule ids are lower-case words joined by hyphens"),
  label: z.enum(["local", "stagnant", "advective"]),
  description: z.string(),
  /** threshold names that must all hold */
  all: z.array(z.string()).min(1),
  /** threshold names that are checked when their metric is available and skipped (with a note) when not */
  optional: z.array(z.string()).default([]),
});

/**
 * Anomaly screening settings (lib/anomalies, lib/ustar). Optional in a rule set; every field has a
 * default, so rule sets written before this section existed keep working unchanged.
 */
export const anomalySettingsSchema = z.object({
  /** |modified z| beyond which a half-hour is anomalous (Iglewicz & Hoaglin 1993 suggest 3.5) */
  threshold: z.number().positive().default(3.5),
  /** consecutive anomalous half-hours needed for a rise or drop */
  minConsecutive: z.number().int().min(1).max(12).default(2),
  /** |modified z| for a single half-hour on its own to count as a spike */
  spikeScore: z.number().positive().default(7),
  /** days on each side of the evening in the moving baseline window */
  baselineHalfWidthDays: z.number().int().min(2).max(60).default(10),
  /** fewest other days with a value at a half-hour of day for a baseline there */
  minBaselineDays: z.number().int().min(3).max(120).default(10),
  /** minutes relative to sunset to screen; default: start of the transition to end of the evening window */
  window: windowSchema.optional(),
  ustar: z
    .object({
      /** SW_IN below this is night, W m-2 */
      nightSwInMax: z.number().min(0).max(100).default(10),
      temperatureClasses: z.number().int().min(1).max(20).default(6),
      ustarClasses: z.number().int().min(5).max(50).default(20),
      /** the flux of the threshold class reaches this fraction of the mean above it */
      plateauFraction: z.number().min(0.5).max(1).default(0.99),
      bootstrap: z.number().int().min(0).max(1000).default(100),
    })
    .prefault({}),
});
export type AnomalySettings = z.infer<typeof anomalySettingsSchema>;

export const ruleSetSchema = z
  .object({
    id: z.string().min(1),
    version: z.number().int().min(1),
    name: z.string().min(1),
    description: z.string().default(""),
    windows: z.object({ afternoon: windowSchema, transition: windowSchema, evening: windowSchema }),
    /** minimum fraction of expected periods with valid core data (u* and wind speed) per window */
    minCoverage: z.object({
      afternoon: z.number().min(0).max(1),
      transition: z.number().min(0).max(1),
      evening: z.number().min(0).max(1),
    }),
    /** wind speed below which direction is undefined, m s-1 */
    calmSpeedMs: z.number().min(0),
    /** leave evenings unclassified when the afternoon window starts before sunrise (short polar-fringe days) */
    requireDaylightAfternoon: z.boolean().default(true),
    thresholds: z.record(z.string().regex(/^[A-Za-z][A-Za-z0-9]*$/), thresholdSchema),
    rules: z.array(ruleSchema).min(1),
    anomalies: anomalySettingsSchema.optional(),
  })
  .superRefine((rs, ctx) => {
    const seen = new Set<string>();
    rs.rules.forEach((rule, i) => {
      if (seen.has(rule.id)) ctx.addIssue({ code: "custom", path: ["rules", i, "id"], message: `duplicate rule id ${rule.id}` });
      seen.add(rule.id);
      for (const key of ["all", "optional"] as const) {
        rule[key].forEach((name, j) => {
          // Own keys only: "constructor" or "toString" would otherwise pass as a threshold.
          if (!Object.hasOwn(rs.thresholds, name))
            ctx.addIssue({ code: "custom", path: ["rules", i, key, j], message: `unknown threshold "${name}"` });
        });
      }
    });
  });

export type RuleSet = z.infer<typeof ruleSetSchema>;
export type RuleSetInput = z.input<typeof ruleSetSchema>;
export type Threshold = RuleSet["thresholds"][string];
export type Rule = RuleSet["rules"][number];

/** Parses and validates a rule set; throws a ZodError whose issues name the offending paths. */
export function parseRuleSet(json: unknown): RuleSet {
  return ruleSetSchema.parse(json);
}

/** The default rule set, version 1: a starting point to tune per site. */
export const DEFAULT_RULE_SET: RuleSet = parseRuleSet({
  id: "gloaming-default",
  version: 1,
  name: "Gloaming default evening rules",
  description:
    "Screening defaults for a tower some metres above a low or moderate canopy. Stagnant is tested first, then advective, then locally driven; evenings matching none stay unclassified.",
  windows: {
    afternoon: { startMinutes: -180, endMinutes: -60 },
    transition: { startMinutes: -60, endMinutes: 60 },
    evening: { startMinutes: 60, endMinutes: 180 },
  },
  minCoverage: { afternoon: 0.5, transition: 0.25, evening: 0.5 },
  calmSpeedMs: 0.5,
  thresholds: {
    stillUstar: {
      kind: "absolute",
      metric: "ustarEvening",
      op: "below",
      value: 0.1,
      description: "evening u* below the usual nighttime flux-filter range (0.1-0.4 m/s)",
    },
    stillWind: {
      kind: "absolute",
      metric: "windSpeedEvening",
      op: "below",
      value: 1.2,
      description: "evening mean wind speed low",
    },
    turnedWind: {
      kind: "absolute",
      metric: "wdShiftAbsDeg",
      op: "above",
      value: 50,
      description: "afternoon-to-evening wind direction shift large (computed only with wind above calm)",
    },
    movingAir: {
      kind: "absolute",
      metric: "windSpeedEvening",
      op: "above",
      value: 1.5,
      description: "evening wind clearly above calm",
    },
    sustainedMixing: {
      kind: "absolute",
      metric: "sigmaWDecay",
      op: "above",
      value: 0.7,
      description: "sigma_w after sunset stays near its afternoon level",
    },
    shearUstar: {
      kind: "absolute",
      metric: "ustarEvening",
      op: "above",
      value: 0.25,
      description: "evening u* high: shear-driven turbulence",
    },
    decayedMixing: {
      kind: "absolute",
      metric: "sigmaWDecay",
      op: "below",
      value: 0.7,
      description: "sigma_w decayed from afternoon to evening",
    },
    stableLayer: {
      kind: "absolute",
      metric: "zetaEvening",
      op: "above",
      value: 0.02,
      description: "evening median z/L stable",
    },
    earlyCooling: {
      kind: "absolute",
      metric: "hZeroCrossingMinutes",
      op: "below",
      value: 60,
      description: "H turned negative before the evening window began",
    },
  },
  rules: [
    {
      id: "still-air",
      label: "stagnant",
      description: "Turbulence and wind nearly vanish after sunset: evening u* and wind speed both low.",
      all: ["stillUstar", "stillWind"],
    },
    {
      id: "wind-turned",
      label: "advective",
      description: "Air from elsewhere: the wind direction shifted strongly while the wind stayed above calm.",
      all: ["turnedWind", "movingAir"],
    },
    {
      id: "shear-kept-mixing",
      label: "advective",
      description: "Mechanical turbulence carries on: sigma_w does not decay and evening u* stays high.",
      all: ["sustainedMixing", "shearUstar"],
    },
    {
      id: "surface-cooling",
      label: "local",
      description: "The surface cools the air from below: sigma_w decays, z/L turns stable, H negative near sunset.",
      all: ["decayedMixing", "stableLayer"],
      optional: ["earlyCooling"],
    },
  ],
});
