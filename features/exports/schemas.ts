import { z } from "zod";

const isoDate = z
  .string({ error: "Give the date as YYYY-MM-DD." })
  .regex(/^\d{4}-\d{2}-\d{2}$/, "Give the date as YYYY-MM-DD.")
  .refine((s) => {
    const t = Date.parse(`${s}T00:00:00Z`);
    return !Number.isNaN(t) && new Date(t).toISOString().startsWith(s);
  }, "Not a calendar date.");

/** GET /api/sites/:siteId/export?from=YYYY-MM-DD&to=YYYY-MM-DD[&halfHours=1], and the export form. */
export const exportQuerySchema = z
  .object({
    from: isoDate,
    to: isoDate,
    halfHours: z
      .enum(["0", "1", "true", "false", "on", ""])
      .optional()
      .transform((v) => v === "1" || v === "true" || v === "on"),
  })
  .refine((q) => q.from <= q.to, { path: ["to"], message: "The end date is before the start date." });

export type ExportQuery = z.infer<typeof exportQuerySchema>;

/** Columns of evenings.csv, in order. */
export const EVENING_COLUMNS = [
  "date",
  "site",
  "label",
  "source",
  "note",
  "rule_set_version",
  "rule",
  "auto_label",
  "reviewed",
  "sunset",
  "civil_dusk",
  "sigma_w_afternoon_m_s",
  "sigma_w_transition_m_s",
  "sigma_w_evening_m_s",
  "sigma_w_decay",
  "ustar_afternoon_m_s",
  "ustar_evening_m_s",
  "wind_speed_evening_m_s",
  "wd_shift_deg",
  "sigma_theta_evening_deg",
  "zeta_evening",
  "h_zero_crossing_min",
  "cooling_rate_k_per_h",
  "dew_point_change_k",
  "coverage_afternoon",
  "coverage_transition",
  "coverage_evening",
] as const;

/** Metric keys of EveningMetrics behind the metric columns above, in the same order. */
export const METRIC_KEYS = [
  "sigmaWAfternoon",
  "sigmaWTransition",
  "sigmaWEvening",
  "sigmaWDecay",
  "ustarAfternoon",
  "ustarEvening",
  "windSpeedEvening",
  "wdShiftDeg",
  "sigmaThetaEvening",
  "zetaEvening",
  "hZeroCrossingMinutes",
  "coolingRateKPerH",
  "dewPointChangeK",
] as const;

/** Measured columns of half-hours.csv (canonical units), as stored. */
export const HALF_HOUR_MEASURES = [
  ["ws", "WS_m_s"],
  ["wd", "WD_deg"],
  ["ustar", "USTAR_m_s"],
  ["w_sigma", "W_SIGMA_m_s"],
  ["h", "H_W_m2"],
  ["le", "LE_W_m2"],
  ["ta", "TA_degC"],
  ["pa", "PA_kPa"],
  ["rh", "RH_percent"],
  ["vpd", "VPD_hPa"],
  ["zl", "ZL"],
  ["mo_length", "MO_LENGTH_m"],
  ["fc", "FC_umol_m2_s"],
  ["co2", "CO2_umol_mol"],
  ["sw_in", "SW_IN_W_m2"],
] as const;
