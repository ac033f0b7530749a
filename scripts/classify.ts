/**
 * Command line: label every evening of a tower file.
 *
 *   npm run --silent classify -- --input FILE --lat DEG --lon DEG --utc-offset HOURS \
 *     --height M --canopy-height M [--elevation M] [--displacement-height M] \
 *     [--rules FILE.json] [--format json|csv] [--timestamp-marks start|end] [--missing CODE,...]
 *
 * Output on stdout, one record per evening: NDJSON (one JSON object per line) by default, or
 * CSV with a header. The read report's warnings go to stderr. Bad input exits with status 2
 * and a message naming the file, the line and the problem; usage errors also exit 2.
 */
import { existsSync, readFileSync } from "node:fs";
import { parseArgs } from "node:util";
import { ZodError } from "zod";
import { classifyTable, type EveningResult } from "@/lib/classify/evenings";
import { DEFAULT_RULE_SET, parseRuleSet, type RuleSet } from "@/lib/classify/rules";
import { siteProblems, type SiteParams } from "@/lib/classify/site";
import { readTableFile, TableError } from "@/lib/series/reader";

const USAGE = `Label every evening of a half-hourly tower file (locally driven, stagnant, advective, unclassified).
Labels are screening aids for research data; thresholds are site-dependent.

Usage:
  npm run --silent classify -- --input FILE --lat DEG --lon DEG --utc-offset HOURS
                               --height M --canopy-height M [options]

Required:
  --input FILE               CSV (or other delimited) table with a timestamp column
  --lat DEG, --lon DEG       site latitude (north +) and longitude (east +)
  --utc-offset HOURS         UTC offset of the data clock, standard time (e.g. -5, 5.5, 13)
  --height M                 measurement height above ground
  --canopy-height M          canopy height
Options:
  --elevation M              site elevation (default 0; used for pressure when PA is missing)
  --displacement-height M    zero-plane displacement (default 2/3 of canopy height)
  --rules FILE.json          rule set (default: the built-in rule set)
  --format json|csv          json = one JSON record per line (NDJSON, default); csv = with header
  --timestamp-marks start|end  what a single timestamp column marks (default end)
  --missing CODES            comma-separated missing codes (default -9999,NA,NaN,N/A,#N/A,null,empty)
  --quiet                    do not print the read report's warnings to stderr
  -h, --help                 this text

Exit status: 0 done, 2 bad input or usage.`;

class UsageError extends Error {}

function num(name: string, value: string | undefined, required: boolean): number | undefined {
  if (value === undefined) {
    if (required) throw new UsageError(`--${name} is required`);
    return undefined;
  }
  const v = Number(value);
  if (value.trim() === "" || !Number.isFinite(v)) throw new UsageError(`--${name} must be a number, got "${value}"`);
  return v;
}

const CSV_COLUMNS = [
  "date", "label", "rule", "sunsetUtc", "civilDuskUtc",
  "sigmaWAfternoon", "sigmaWTransition", "sigmaWEvening", "sigmaWDecay", "ustarAfternoon", "ustarEvening",
  "windSpeedEvening", "wdShiftDeg", "sigmaThetaEvening", "zetaEvening", "hZeroCrossingMinutes",
  "coolingRateKPerH", "dewPointChangeK", "coverageAfternoon", "coverageTransition", "coverageEvening",
  "derived", "reasons",
] as const;

function csvCell(v: unknown): string {
  if (v === null || v === undefined) return "";
  const s =
    typeof v === "number"
      ? Number.isFinite(v)
        ? String(+v.toPrecision(6))
        : ""
      : typeof v === "string"
        ? v
        : JSON.stringify(v);
  return /[",\n\r]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function csvRow(e: EveningResult): string {
  const m = e.metrics;
  const values: Record<(typeof CSV_COLUMNS)[number], unknown> = {
    date: e.date,
    label: e.label,
    rule: e.rule,
    sunsetUtc: e.sunsetUtc,
    civilDuskUtc: e.civilDuskUtc,
    sigmaWAfternoon: m.sigmaWAfternoon,
    sigmaWTransition: m.sigmaWTransition,
    sigmaWEvening: m.sigmaWEvening,
    sigmaWDecay: m.sigmaWDecay,
    ustarAfternoon: m.ustarAfternoon,
    ustarEvening: m.ustarEvening,
    windSpeedEvening: m.windSpeedEvening,
    wdShiftDeg: m.wdShiftDeg,
    sigmaThetaEvening: m.sigmaThetaEvening,
    zetaEvening: m.zetaEvening,
    hZeroCrossingMinutes: m.hZeroCrossingMinutes,
    coolingRateKPerH: m.coolingRateKPerH,
    dewPointChangeK: m.dewPointChangeK,
    coverageAfternoon: m.coverage.afternoon,
    coverageTransition: m.coverage.transition,
    coverageEvening: m.coverage.evening,
    derived: m.derived.join("; "),
    reasons: e.reasons.join("; "),
  };
  return CSV_COLUMNS.map((c) => csvCell(values[c])).join(",");
}

/** Round floats in the JSON output to 6 significant digits; the data do not carry more. */
function roundReplacer(_key: string, value: unknown): unknown {
  return typeof value === "number" && Number.isFinite(value) && !Number.isInteger(value) ? +value.toPrecision(6) : value;
}

async function main(argv: string[]): Promise<number> {
  const { values } = parseArgs({
    args: argv,
    options: {
      input: { type: "string" },
      lat: { type: "string" },
      lon: { type: "string" },
      "utc-offset": { type: "string" },
      height: { type: "string" },
      "canopy-height": { type: "string" },
      elevation: { type: "string" },
      "displacement-height": { type: "string" },
      rules: { type: "string" },
      format: { type: "string", default: "json" },
      "timestamp-marks": { type: "string" },
      missing: { type: "string" },
      quiet: { type: "boolean", default: false },
      help: { type: "boolean", short: "h", default: false },
    },
    strict: true,
    allowPositionals: false,
  });
  if (values.help) {
    process.stdout.write(`${USAGE}\n`);
    return 0;
  }
  const input = values.input;
  if (!input) throw new UsageError("--input is required");
  const format = values.format;
  if (format !== "json" && format !== "csv") throw new UsageError(`--format must be json or csv, got "${format}"`);
  const marks = values["timestamp-marks"];
  if (marks !== undefined && marks !== "start" && marks !== "end") throw new UsageError(`--timestamp-marks must be start or end, got "${marks}"`);

  const site: SiteParams = {
    latitudeDeg: num("lat", values.lat, true) as number,
    longitudeDeg: num("lon", values.lon, true) as number,
    utcOffsetHours: num("utc-offset", values["utc-offset"], true) as number,
    measurementHeightM: num("height", values.height, true) as number,
    canopyHeightM: num("canopy-height", values["canopy-height"], true) as number,
    elevationM: num("elevation", values.elevation, false) ?? 0,
    displacementHeightM: num("displacement-height", values["displacement-height"], false) ?? null,
  };
  const problems = siteProblems(site);
  if (problems.length > 0) throw new UsageError(problems.join("; "));

  let rules: RuleSet = DEFAULT_RULE_SET;
  if (values.rules !== undefined) {
    const path = values.rules;
    let json: unknown;
    try {
      json = JSON.parse(readFileSync(path, "utf8"));
    } catch (e) {
      process.stderr.write(`${path}: cannot read the rule set: ${(e as Error).message}\n`);
      return 2;
    }
    try {
      rules = parseRuleSet(json);
    } catch (e) {
      if (e instanceof ZodError) {
        const issues = e.issues.map((i) => `${i.path.join(".") || "(root)"}: ${i.message}`).join("; ");
        process.stderr.write(`${path}: invalid rule set: ${issues}\n`);
        return 2;
      }
      throw e;
    }
  }

  if (!existsSync(input)) {
    process.stderr.write(`${input}: no such file\n`);
    return 2;
  }
  let result;
  try {
    result = await readTableFile(input, {
      utcOffsetHours: site.utcOffsetHours,
      ...(marks !== undefined ? { timestampConvention: marks } : {}),
      ...(values.missing !== undefined ? { missingCodes: values.missing.split(",").map((c) => (c === "empty" ? "" : c)) } : {}),
    });
  } catch (e) {
    if (e instanceof TableError) {
      process.stderr.write(`${input}: ${e.row !== null ? `line ${e.row}: ` : ""}${e.message}\n`);
      return 2;
    }
    throw e;
  }
  const { table, report } = result;
  if (!values.quiet) {
    for (const w of report.warnings) process.stderr.write(`${input}: warning: ${w}\n`);
    const rejected = report.rejected.length + report.rejectedNotListed;
    if (rejected > 0) {
      const first = report.rejected[0];
      process.stderr.write(`${input}: ${rejected} cells rejected${first ? ` (first: line ${first.row}, ${first.column} "${first.value}": ${first.reason})` : ""}\n`);
    }
  }

  const evenings = classifyTable(table, site, rules);
  const out: string[] = [];
  if (format === "csv") out.push(CSV_COLUMNS.join(","));
  for (const e of evenings) out.push(format === "csv" ? csvRow(e) : JSON.stringify(e, roundReplacer));
  process.stdout.write(out.length > 0 ? `${out.join("\n")}\n` : "");
  return 0;
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    if (e instanceof UsageError || (e instanceof TypeError && "code" in e && String(e.code).startsWith("ERR_PARSE_ARGS"))) {
      process.stderr.write(`classify: ${e.message}\n\n${USAGE}\n`);
      process.exitCode = 2;
      return;
    }
    process.stderr.write(`classify: ${(e as Error).stack ?? String(e)}\n`);
    process.exitCode = 1;
  },
);
