/**
 * The in-memory shape of a half-hourly (or other fixed-interval) tower table,
 * shared by the reader (lib/series), the classifier (lib/classify) and the import.
 *
 * Units are the canonical units below, whatever the file used; the reader converts.
 * Missing values are NaN, never a sentinel such as -9999.
 */

/** Canonical variables the product knows, with their canonical unit. */
export const VARIABLES = {
  WS: { unit: "m s-1", description: "horizontal wind speed" },
  WD: { unit: "deg", description: "wind direction, degrees from north, where the wind comes from" },
  USTAR: { unit: "m s-1", description: "friction velocity u*" },
  W_SIGMA: { unit: "m s-1", description: "standard deviation of vertical wind sigma_w" },
  H: { unit: "W m-2", description: "sensible heat flux" },
  LE: { unit: "W m-2", description: "latent heat flux" },
  TA: { unit: "degC", description: "air temperature" },
  PA: { unit: "kPa", description: "air pressure" },
  RH: { unit: "%", description: "relative humidity" },
  VPD: { unit: "hPa", description: "vapour pressure deficit" },
  ZL: { unit: "1", description: "Monin-Obukhov stability parameter z/L" },
  MO_LENGTH: { unit: "m", description: "Obukhov length L" },
  FC: { unit: "umol m-2 s-1", description: "CO2 flux" },
  CO2: { unit: "umol mol-1", description: "CO2 mole fraction" },
  SW_IN: { unit: "W m-2", description: "incoming shortwave radiation" },
} as const;

export type KnownVariable = keyof typeof VARIABLES;

/**
 * A column name in a table: a known variable, or a tracer the group mapped
 * (e.g. "O3", "ISOPRENE"), kept in the unit the user declared.
 */
export type ColumnName = KnownVariable | (string & {});

export interface HalfHourTable {
  /** UTC epoch milliseconds of the START of each averaging period, strictly increasing. */
  startMs: Float64Array;
  /** Length of the averaging period in minutes (30 for half-hourly data). */
  periodMinutes: number;
  /** One Float64Array per column, same length as startMs, NaN where missing. */
  columns: Partial<Record<ColumnName, Float64Array>>;
  /** Units of the columns as held (canonical for known variables, declared for tracers). */
  units: Partial<Record<ColumnName, string>>;
}
