/** A tower site as the classifier needs it. Heights in metres above ground. */
export interface SiteParams {
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  /** Measurement height z_m, m. */
  measurementHeightM: number;
  /** Canopy height h_c, m. */
  canopyHeightM: number;
  /** Zero-plane displacement d, m; default 2/3 h_c. */
  displacementHeightM?: number | null;
  /** UTC offset of the data clock AND of "local date", hours (standard time, no DST). */
  utcOffsetHours: number;
}

/** Reasons a site cannot be classified, empty when it can. */
export function siteProblems(site: SiteParams): string[] {
  const out: string[] = [];
  if (!(site.latitudeDeg >= -90 && site.latitudeDeg <= 90)) out.push(`latitude ${site.latitudeDeg} is outside -90..90`);
  if (!(site.longitudeDeg >= -180 && site.longitudeDeg <= 180))
    out.push(`longitude ${site.longitudeDeg} is outside -180..180`);
  if (!(site.utcOffsetHours >= -14 && site.utcOffsetHours <= 14))
    out.push(`UTC offset ${site.utcOffsetHours} h is outside -14..14`);
  if (!(site.measurementHeightM > 0)) out.push("measurement height must be > 0 m");
  if (!(site.canopyHeightM >= 0)) out.push("canopy height must be >= 0 m");
  const d = site.displacementHeightM ?? (2 / 3) * site.canopyHeightM;
  if (!(d < site.measurementHeightM)) out.push(`displacement height ${d} m must be below the measurement height`);
  if (!Number.isFinite(site.elevationM)) out.push("elevation must be a number");
  return out;
}
