/**
 * Column-name and unit recognition for tower tables. Pure and client-safe: the import page
 * runs it in the browser on the first lines of a file to show what will be read.
 *
 * Names follow the trade's usual conventions (common practice): a variable name, optional
 * `_PI` (provider-processed), optional `_F` / `_F_MDS` / `_GF` (gap-filled), optional
 * positional qualifier `_H_V_R` (one to three integers, e.g. `TA_1_2_1`), and units either in
 * a second header row, in brackets after the name (`TA (degC)`, `PA [hPa]`) or as a trailing
 * token (`TA_K`, `PA_hPa`).
 */
import { VARIABLES, type ColumnName, type KnownVariable } from "@/lib/series/types";

/** DATE and TIME are separate date and clock-time columns, joined into one stamp. */
export type TimestampRole = "TIMESTAMP_START" | "TIMESTAMP_END" | "TIMESTAMP" | "DATE" | "TIME";
export type ColumnTarget = ColumnName | TimestampRole;

export interface ColumnGuess {
  /** 0-based index of the column in the file. */
  index: number;
  /** Header text as in the file (trimmed). */
  header: string;
  /** Recognised variable or timestamp role; null when not recognised. */
  variable: KnownVariable | TimestampRole | null;
  /** Unit text as declared (units row, brackets or name token); null when none declared. */
  unit: string | null;
  unitSource: "units row" | "name" | null;
  /** `_F`, `_F_MDS` or `_GF`: values filled by a gap-filling model rather than measured. */
  gapFilled: boolean;
  /** Positional qualifier without the leading underscore, e.g. "1_1_1". */
  position?: string;
  /** 1 = the trade's own name, 0.8 = a spelled-out alias, 0.6 = alias found after removing a unit token, 0 = none. */
  confidence: number;
}

const TIMESTAMP_ROLES: readonly TimestampRole[] = ["TIMESTAMP_START", "TIMESTAMP_END", "TIMESTAMP", "DATE", "TIME"];

export function isTimestampRole(v: string | null | undefined): v is TimestampRole {
  return v === "TIMESTAMP_START" || v === "TIMESTAMP_END" || v === "TIMESTAMP" || v === "DATE" || v === "TIME";
}

export function isKnownVariable(v: string | null | undefined): v is KnownVariable {
  return v != null && Object.prototype.hasOwnProperty.call(VARIABLES, v);
}

/** Lower-case, separators to "_", "*" to "star", so "u*", "Wind Speed" and "wind-speed" meet. */
function normalizeName(s: string): string {
  return s
    .trim()
    .toLowerCase()
    .replace(/\*/g, "star")
    .replace(/[\s\-.\/]+/g, "_")
    .replace(/^_+|_+$/g, "");
}

/** Spelled-out names seen in loggers' and processing programs' outputs (common practice). */
const ALIASES: Record<KnownVariable | TimestampRole, string[]> = {
  WS: ["wind_speed", "windspeed", "wspd", "wind_spd", "ws_mean", "mean_wind_speed"],
  WD: ["wind_dir", "winddir", "wind_direction", "winddirection", "wdir", "wd_mean"],
  USTAR: ["u_star", "ustar", "u*", "friction_velocity", "u_friction"],
  W_SIGMA: ["sigma_w", "sigmaw", "w_sigma", "w_sd", "sd_w", "std_w", "w_std", "stdev_w", "w_stdev"],
  H: ["sensible_heat", "sensible_heat_flux", "sensibleheat", "hs", "qh", "shf", "h_flux"],
  LE: ["latent_heat", "latent_heat_flux", "latentheat", "qle", "lhf", "le_flux"],
  TA: ["tair", "t_air", "air_temperature", "air_temp", "airtemp", "temp_air", "temperature", "t_a"],
  PA: ["pressure", "air_pressure", "p_air", "pair", "baro", "barometric_pressure", "press", "atm_pressure"],
  RH: ["relative_humidity", "relhum", "rel_hum"],
  VPD: ["vapour_pressure_deficit", "vapor_pressure_deficit"],
  ZL: ["z_l", "z/l", "(z-d)/l", "zeta", "zol", "z_over_l"],
  MO_LENGTH: ["l", "obukhov_length", "monin_obukhov_length", "mo_len", "obukhov", "l_mo"],
  FC: ["co2_flux", "fco2", "f_co2", "flux_co2", "co2flux"],
  CO2: ["co2_mole_fraction", "co2_mixing_ratio", "co2_conc", "co2_concentration", "xco2", "co2_ppm"],
  SW_IN: ["rg", "sw_in", "swin", "sw_down", "swdown", "sw_incoming", "shortwave_in", "global_radiation", "rs_in", "rsd", "solar_radiation", "sw_inc"],
  TIMESTAMP_START: ["ts_start", "start", "start_time", "time_start", "datetime_start", "date_time_start", "period_start"],
  TIMESTAMP_END: ["ts_end", "end", "end_time", "time_end", "datetime_end", "date_time_end", "period_end"],
  TIMESTAMP: ["timestamp", "datetime", "date_time", "date_and_time", "time_stamp", "date/time", "timestamp_local"],
  DATE: ["date", "day", "date_local"],
  TIME: ["time", "clock_time", "time_local", "hh:mm", "hhmm"],
};

const EXACT = new Map<string, KnownVariable | TimestampRole>();
const ALIAS = new Map<string, KnownVariable | TimestampRole>();
for (const v of [...(Object.keys(VARIABLES) as KnownVariable[]), ...TIMESTAMP_ROLES]) {
  EXACT.set(normalizeName(v), v);
}
for (const [v, names] of Object.entries(ALIASES) as [KnownVariable | TimestampRole, string[]][]) {
  for (const n of names) {
    const k = normalizeName(n);
    if (!EXACT.has(k)) ALIAS.set(k, v);
  }
}

/** Trailing unit tokens in names like "TA_K" or "PA_hPa". "_F" is not one: it means gap-filled. */
const NAME_UNIT_TOKEN = /_(k|c|degc|deg_c|degf|kpa|hpa|pa|mbar|ms|m_s|ms_1|m_s_1|wm2|w_m2|w_m_2|pct|percent|ppm|umol_mol|deg)$/;

interface NameParts {
  base: string;
  gapFilled: boolean;
  position?: string;
}

function splitSuffixes(norm: string): NameParts {
  let base = norm;
  let position: string | undefined;
  const pos = /_(\d+(?:_\d+){0,2})$/.exec(base);
  if (pos && pos.index > 0) {
    position = pos[1];
    base = base.slice(0, pos.index);
  }
  let gapFilled = false;
  const gf = /_(f_mds|f|gf|filled)$/.exec(base);
  if (gf && gf.index > 0) {
    gapFilled = true;
    base = base.slice(0, gf.index);
  }
  if (/_pi$/.test(base) && base.length > 3) base = base.slice(0, -3);
  return position === undefined ? { base, gapFilled } : { base, gapFilled, position };
}

/** Unit in trailing brackets: "TA (degC)" -> ["TA", "degC"]. "(z-d)/L" keeps its brackets. */
function splitBracketUnit(header: string): [string, string | null] {
  const m = /^(.*?\S)\s*[([]([^()[\]]*)[)\]]\s*$/.exec(header.trim());
  if (m && m[1] !== undefined && m[2] !== undefined) return [m[1], m[2].trim()];
  return [header.trim(), null];
}

/**
 * Recognise one header cell. Returns the variable (or timestamp role), the unit found in the
 * name, and the suffix facts; `variable` is null when the name is not one we know.
 */
export function recognizeName(header: string): Omit<ColumnGuess, "index" | "unitSource"> & { nameUnit: string | null } {
  const trimmed = header.trim();
  const [nameNoBracket, bracketUnit] = splitBracketUnit(trimmed);
  const attempt = (name: string): { v: KnownVariable | TimestampRole; conf: number; parts: NameParts } | null => {
    const norm = normalizeName(name);
    const whole = EXACT.get(norm) ?? ALIAS.get(norm);
    if (whole) return { v: whole, conf: EXACT.has(norm) ? 1 : 0.8, parts: { base: norm, gapFilled: false } };
    const parts = splitSuffixes(norm);
    // Timestamps carry no position or gap-filling suffix: "TS_1_1_1" is soil temperature.
    const suffixed = (v: KnownVariable | TimestampRole | undefined) => (v && isTimestampRole(v) ? undefined : v);
    const e = suffixed(EXACT.get(parts.base));
    if (e) return { v: e, conf: 1, parts };
    const a = suffixed(ALIAS.get(parts.base));
    if (a) return { v: a, conf: 0.8, parts };
    return null;
  };
  let found = attempt(nameNoBracket);
  let nameUnit = bracketUnit;
  if (!found) {
    const norm = normalizeName(nameNoBracket);
    const parts = splitSuffixes(norm);
    const tok = NAME_UNIT_TOKEN.exec(parts.base);
    if (tok && tok.index > 0) {
      const inner = attempt(parts.base.slice(0, tok.index));
      if (inner) {
        found = { v: inner.v, conf: 0.6, parts: { ...parts, base: inner.parts.base } };
        nameUnit = nameUnit ?? (tok[1] ?? null);
      }
    }
  }
  if (!found) return { header: trimmed, variable: null, unit: nameUnit, nameUnit, gapFilled: false, confidence: 0 };
  const isTs = isTimestampRole(found.v);
  const out: Omit<ColumnGuess, "index" | "unitSource"> & { nameUnit: string | null } = {
    header: trimmed,
    variable: found.v,
    unit: nameUnit,
    nameUnit,
    gapFilled: isTs ? false : found.parts.gapFilled,
    confidence: found.conf,
  };
  if (!isTs && found.parts.position !== undefined) out.position = found.parts.position;
  return out;
}

/**
 * Guess the meaning and unit of every column from the header row and, when present, the units
 * row below it. A unit in the units row wins over one in the name.
 */
export function recognizeColumns(headers: string[], unitsRow?: string[]): ColumnGuess[] {
  return headers.map((h, index) => {
    const r = recognizeName(h);
    const rowUnit = unitsRow?.[index]?.trim();
    let unit: string | null = null;
    let unitSource: ColumnGuess["unitSource"] = null;
    if (rowUnit) {
      unit = rowUnit;
      unitSource = "units row";
    } else if (r.nameUnit) {
      unit = r.nameUnit;
      unitSource = "name";
    }
    const g: ColumnGuess = {
      index,
      header: r.header,
      variable: r.variable,
      unit,
      unitSource,
      gapFilled: r.gapFilled,
      confidence: r.confidence,
    };
    if (r.position !== undefined) g.position = r.position;
    return g;
  });
}

// ---------------------------------------------------------------------------------------------
// Units

/** Units we understand, by a key of our own; each with the spellings seen in files (common practice). */
const UNIT_SPELLINGS: Record<string, string[]> = {
  "m/s": ["m/s", "m s-1", "ms-1", "m s^-1", "m/sec", "mps", "m+1s-1", "meters/second", "m.s-1"],
  "km/h": ["km/h", "km h-1", "kmh", "kph", "km/hr"],
  "cm/s": ["cm/s", "cm s-1"],
  kn: ["kn", "knots", "kt", "kts"],
  mph: ["mph", "mi/h"],
  deg: ["deg", "degrees", "degree", "°", "deg from north", "degrees from north", "decimal degrees", "azimuth"],
  degC: ["degC", "deg C", "°C", "C", "celsius", "degrees C", "deg_C", "degreesC", "oC", "°c"],
  K: ["K", "kelvin", "deg K", "°K"],
  degF: ["degF", "°F", "F", "fahrenheit", "deg F"],
  kPa: ["kPa", "kilopascal"],
  hPa: ["hPa", "mbar", "mb", "millibar", "hectopascal"],
  Pa: ["Pa", "pascal"],
  "W/m2": ["W/m2", "W m-2", "Wm-2", "W/m^2", "W m^-2", "W+1m-2", "W.m-2", "W/m²", "W m²"],
  "%": ["%", "percent", "pct", "%RH", "% RH"],
  fraction: ["fraction", "0-1", "frac"],
  "umol/mol": ["umol/mol", "umol mol-1", "µmol/mol", "µmol mol-1", "μmol/mol", "μmol mol-1", "ppm", "ppmv", "umol+1mol-1", "µmol+1mol-1", "umolmol-1"],
  "mmol/mol": ["mmol/mol", "mmol mol-1", "mmol+1mol-1", "ppt"],
  "umol/m2/s": ["umol/m2/s", "umol m-2 s-1", "µmol m-2 s-1", "μmol m-2 s-1", "umol/m^2/s", "µmol/m2/s", "umolm-2s-1", "µmol+1s-1m-2", "umol+1s-1m-2", "umol s-1 m-2", "µmol s-1 m-2", "umol m-2 s-1 co2", "umolco2 m-2 s-1", "umolco2/m2/s"],
  "mg/m2/s": ["mg/m2/s", "mg m-2 s-1", "mg+1s-1m-2", "mgco2 m-2 s-1", "mg co2 m-2 s-1"],
  "1": ["1", "-", "dimensionless", "adim", "adimensional", "nondimensional", "none", "unitless", "#", "[-]", "z/L"],
  m: ["m", "meters", "metres", "meter", "metre", "m+1"],
};

/** Compact a unit string so spellings meet: case, spaces, brackets, "^", "+1", micro signs. */
function compactUnit(s: string): string {
  return s
    .trim()
    .replace(/^[[(]\s*|\s*[\])]$/g, "")
    .replace(/[µμ]/g, "u")
    .replace(/²/g, "2")
    .replace(/\^/g, "")
    .replace(/\+1/g, "")
    .replace(/[\s.*_]+/g, "")
    .toLowerCase();
}

const UNIT_LOOKUP = new Map<string, string>();
for (const [key, spellings] of Object.entries(UNIT_SPELLINGS)) {
  for (const s of [key, ...spellings]) {
    const c = compactUnit(s);
    // Case matters only where lower-casing would merge different units; none of ours collide
    // except "K"/"k" (no "k" unit here) and "pa"/"Pa": fine.
    if (!UNIT_LOOKUP.has(c)) UNIT_LOOKUP.set(c, key);
  }
}

/** Our key for a declared unit ("hPa", "degC", "m/s" ...) or null when not understood. */
export function parseUnit(raw: string | null | undefined): string | null {
  if (raw == null) return null;
  const c = compactUnit(raw);
  if (c === "") return null;
  return UNIT_LOOKUP.get(c) ?? null;
}

/** A linear conversion to the canonical unit: canonical = value * scale + offset. */
export interface Conversion {
  from: string;
  to: string;
  scale: number;
  offset: number;
}

type Dimension = "speed" | "direction" | "energyFlux" | "temperature" | "pressure" | "percent" | "moleFraction" | "molarFlux" | "dimensionless" | "length";

const DIMENSION: Record<KnownVariable, Dimension> = {
  WS: "speed",
  WD: "direction",
  USTAR: "speed",
  W_SIGMA: "speed",
  H: "energyFlux",
  LE: "energyFlux",
  TA: "temperature",
  PA: "pressure",
  RH: "percent",
  VPD: "pressure",
  ZL: "dimensionless",
  MO_LENGTH: "length",
  FC: "molarFlux",
  CO2: "moleFraction",
  SW_IN: "energyFlux",
};

/** Our unit key of each variable's canonical unit. */
const CANONICAL_KEY: Record<KnownVariable, string> = {
  WS: "m/s",
  WD: "deg",
  USTAR: "m/s",
  W_SIGMA: "m/s",
  H: "W/m2",
  LE: "W/m2",
  TA: "degC",
  PA: "kPa",
  RH: "%",
  VPD: "hPa",
  ZL: "1",
  MO_LENGTH: "m",
  FC: "umol/m2/s",
  CO2: "umol/mol",
  SW_IN: "W/m2",
};

/** Value of one unit in SI-ish base of its dimension: [scale, offset] to a reference unit. */
const TO_REFERENCE: Record<Dimension, Record<string, [number, number]>> = {
  speed: { "m/s": [1, 0], "km/h": [1 / 3.6, 0], "cm/s": [0.01, 0], kn: [1852 / 3600, 0], mph: [0.44704, 0] },
  direction: { deg: [1, 0] },
  energyFlux: { "W/m2": [1, 0] },
  temperature: { degC: [1, 0], K: [1, -273.15], degF: [5 / 9, (-32 * 5) / 9] },
  pressure: { kPa: [1, 0], hPa: [0.1, 0], Pa: [0.001, 0] },
  percent: { "%": [1, 0], fraction: [100, 0] },
  moleFraction: { "umol/mol": [1, 0], "mmol/mol": [1000, 0] },
  // CO2 molar mass 44.0095 g/mol (common practice).
  molarFlux: { "umol/m2/s": [1, 0], "mg/m2/s": [1000 / 44.0095, 0] },
  dimensionless: { "1": [1, 0] },
  length: { m: [1, 0] },
};

/**
 * The conversion of a declared unit to the canonical unit of `variable`, or null when the unit
 * is not understood or does not fit the variable (e.g. "K" for wind speed).
 * A missing declaration (null) means the canonical unit.
 */
export function conversionFor(variable: KnownVariable, declared: string | null): Conversion | null {
  const to = CANONICAL_KEY[variable];
  if (declared == null || declared.trim() === "") return { from: to, to, scale: 1, offset: 0 };
  const key = parseUnit(declared);
  if (key == null) return null;
  const table = TO_REFERENCE[DIMENSION[variable]];
  const src = table[key];
  const dst = table[to];
  if (!src || !dst) return null;
  // canonical = (x * s1 + o1 - o2) / s2
  return { from: key, to, scale: src[0] / dst[0], offset: (src[1] - dst[1]) / dst[0] };
}

/** The canonical unit text of a variable as stored in HalfHourTable.units. */
export function canonicalUnit(variable: KnownVariable): string {
  return VARIABLES[variable].unit;
}

const NUMERIC = /^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$/;

/**
 * Whether a row right under the header is a row of units: no numbers, and at least one cell,
 * and at least a third of the filled cells, are units we know or bracketed unit-like text.
 */
export function looksLikeUnitsRow(cells: readonly string[]): boolean {
  let filled = 0;
  let units = 0;
  for (const c of cells) {
    const t = c.trim();
    if (t === "") continue;
    filled++;
    if (NUMERIC.test(t) && t !== "1") return false;
    if (parseUnit(t) != null || /^\[[^\]]*\]$/.test(t)) units++;
  }
  return units > 0 && units * 3 >= filled;
}

// ---------------------------------------------------------------------------------------------
// Choosing the columns to read

/** A target with an optional declared unit; null excludes the column. */
export type MappingEntry = ColumnTarget | { variable: ColumnTarget; unit?: string } | null;

/**
 * Explicit column mapping, keyed by header text as in the file (matched exactly, then
 * case-insensitively). It overrides recognition: a mapped column is read as its target, a
 * column mapped to null is left out, a tracer name ("O3") is read in the unit declared.
 */
export type ColumnMapping = Record<string, MappingEntry>;

export type TimestampPlan =
  | { kind: "pair"; start: number; end: number }
  | { kind: "start"; start: number }
  | { kind: "end"; end: number }
  | { kind: "single"; index: number }
  | { kind: "dateTime"; date: number; time: number };

export interface PlannedColumn {
  index: number;
  header: string;
  name: ColumnName;
  known: boolean;
  unit: string | null;
  gapFilled: boolean;
  source: "recognised" | "mapped";
}

export interface IgnoredColumn {
  index: number;
  header: string;
  reason: string;
}

export interface ColumnPlan {
  timestamp: TimestampPlan | null;
  /** Header texts of the timestamp columns used. */
  timestampHeaders: string[];
  columns: PlannedColumn[];
  ignored: IgnoredColumn[];
  /** Mapping keys that match no header. */
  unmatchedMappingKeys: string[];
  /** Problems that make the plan unusable (e.g. two columns mapped to one name). */
  conflicts: string[];
}

function entryOf(e: MappingEntry): { variable: ColumnTarget; unit?: string } | null {
  if (e === null) return null;
  return typeof e === "string" ? { variable: e } : e;
}

/**
 * Decide which column feeds each variable: an explicit mapping first, then a measured column
 * over a gap-filled one (gap-filled values are model output), then the higher confidence, then
 * the first in the file. The others are listed as ignored with the reason.
 */
export function resolveColumns(guesses: readonly ColumnGuess[], mapping?: ColumnMapping): ColumnPlan {
  const mapped = new Map<number, { variable: ColumnTarget; unit?: string } | null>();
  const unmatchedMappingKeys: string[] = [];
  const conflicts: string[] = [];
  for (const [key, value] of Object.entries(mapping ?? {})) {
    let g = guesses.find((x) => x.header === key.trim());
    g ??= guesses.find((x) => x.header.toLowerCase() === key.trim().toLowerCase());
    if (!g) {
      unmatchedMappingKeys.push(key);
      continue;
    }
    mapped.set(g.index, entryOf(value));
  }
  const mappedTargets = new Map<string, number>();
  for (const [index, e] of mapped) {
    if (!e) continue;
    const prev = mappedTargets.get(e.variable);
    if (prev !== undefined) {
      conflicts.push(`columns "${guesses[prev]?.header}" and "${guesses[index]?.header}" are both mapped to ${e.variable}`);
    }
    mappedTargets.set(e.variable, index);
  }
  const mappingHasTimestamp = [...mappedTargets.keys()].some(isTimestampRole);

  const ignored: IgnoredColumn[] = [];
  const byTarget = new Map<string, { g: ColumnGuess; unit: string | null; source: PlannedColumn["source"] }[]>();
  for (const g of guesses) {
    let target: string | null = g.variable;
    let unit = g.unit;
    let source: PlannedColumn["source"] = "recognised";
    if (mapped.has(g.index)) {
      const e = mapped.get(g.index) ?? null;
      if (!e) {
        ignored.push({ index: g.index, header: g.header, reason: "left out by the mapping" });
        continue;
      }
      target = e.variable;
      unit = e.unit ?? g.unit;
      source = "mapped";
    } else if (target !== null && mappedTargets.has(target)) {
      ignored.push({ index: g.index, header: g.header, reason: `the mapping reads ${target} from "${guesses[mappedTargets.get(target) ?? 0]?.header}"` });
      continue;
    } else if (target !== null && isTimestampRole(target) && mappingHasTimestamp) {
      ignored.push({ index: g.index, header: g.header, reason: "the mapping names the timestamp columns" });
      continue;
    }
    if (target === null) {
      if (g.header !== "") ignored.push({ index: g.index, header: g.header, reason: "not recognised (map it to read it)" });
      continue;
    }
    const list = byTarget.get(target) ?? [];
    list.push({ g, unit, source });
    byTarget.set(target, list);
  }

  const columns: PlannedColumn[] = [];
  const chosenTs = new Map<TimestampRole, ColumnGuess>();
  for (const [target, list] of byTarget) {
    list.sort(
      (a, b) =>
        (a.source === "mapped" ? 0 : 1) - (b.source === "mapped" ? 0 : 1) ||
        Number(a.g.gapFilled) - Number(b.g.gapFilled) ||
        b.g.confidence - a.g.confidence ||
        a.g.index - b.g.index,
    );
    const best = list[0];
    if (!best) continue;
    for (const other of list.slice(1)) {
      ignored.push({ index: other.g.index, header: other.g.header, reason: `${target} is read from "${best.g.header}" (map this column to use it instead)` });
    }
    if (isTimestampRole(target)) {
      chosenTs.set(target, best.g);
      continue;
    }
    columns.push({
      index: best.g.index,
      header: best.g.header,
      name: target,
      known: isKnownVariable(target),
      unit: best.unit,
      gapFilled: best.g.gapFilled,
      source: best.source,
    });
  }
  columns.sort((a, b) => a.index - b.index);

  const s = chosenTs.get("TIMESTAMP_START");
  const e = chosenTs.get("TIMESTAMP_END");
  const single = chosenTs.get("TIMESTAMP");
  const date = chosenTs.get("DATE");
  const time = chosenTs.get("TIME");
  let timestamp: TimestampPlan | null = null;
  let used: ColumnGuess[] = [];
  if (s && e) [timestamp, used] = [{ kind: "pair", start: s.index, end: e.index }, [s, e]];
  else if (s) [timestamp, used] = [{ kind: "start", start: s.index }, [s]];
  else if (e) [timestamp, used] = [{ kind: "end", end: e.index }, [e]];
  else if (single) [timestamp, used] = [{ kind: "single", index: single.index }, [single]];
  else if (date && time) [timestamp, used] = [{ kind: "dateTime", date: date.index, time: time.index }, [date, time]];
  else if (time) [timestamp, used] = [{ kind: "single", index: time.index }, [time]];
  for (const g of [s, e, single, date, time]) {
    if (g && !used.includes(g)) ignored.push({ index: g.index, header: g.header, reason: "another timestamp column is used" });
  }
  ignored.sort((a, b) => a.index - b.index);
  return { timestamp, timestampHeaders: used.map((g) => g.header), columns, ignored, unmatchedMappingKeys, conflicts };
}
