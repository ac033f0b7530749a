import { execFile } from "node:child_process";
import { createWriteStream, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { once } from "node:events";
import { promisify } from "node:util";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { SiteParams } from "@/lib/classify/site";
import { syntheticCsvChunks } from "@/lib/synthetic/csv";
import { generateSynthetic, type SyntheticTruth } from "@/lib/synthetic/generator";

// All tower data here is SYNTHETIC (lib/synthetic), generated for the test; no site measured it.

const run = promisify(execFile);
const SITE: SiteParams = { latitudeDeg: 47.3, longitudeDeg: 8.5, elevationM: 450, measurementHeightM: 10, canopyHeightM: 0.5, utcOffsetHours: 1 };
const SYNTH = { site: SITE, startDate: "2021-01-01", days: 730, seed: 11 };
const siteArgs = ["--lat", "47.3", "--lon", "8.5", "--utc-offset", "1", "--height", "10", "--canopy-height", "0.5", "--elevation", "450"];

let dir = "";
let file = "";
let truth: SyntheticTruth[] = [];

async function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const r = await run(process.execPath, ["--import", "tsx", "scripts/classify.ts", ...args], { cwd: process.cwd(), maxBuffer: 64 << 20 });
    return { code: 0, stdout: r.stdout, stderr: r.stderr };
  } catch (e) {
    const x = e as { code?: number; stdout?: string; stderr?: string };
    return { code: x.code ?? -1, stdout: x.stdout ?? "", stderr: x.stderr ?? "" };
  }
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "gloaming-cli-"));
  file = join(dir, "synthetic-2y.csv");
  const out = createWriteStream(file);
  for (const chunk of syntheticCsvChunks(SYNTH)) if (!out.write(chunk)) await once(out, "drain");
  out.end();
  await once(out, "finish");
  truth = generateSynthetic(SYNTH).truth;
});

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe("classify command line", () => {
  test("classifies a generated two-year file: one NDJSON record per evening with the required fields", async () => {
    const r = await cli(["--input", file, ...siteArgs]);
    expect(r.code).toBe(0);
    const records = r.stdout.trim().split("\n").map((l) => JSON.parse(l) as Record<string, unknown>);
    expect(records.map((x) => x.date)).toEqual(truth.map((t) => t.date));
    for (const rec of records) {
      expect(rec.date).toMatch(/^\d{4}-\d{2}-\d{2}$/);
      expect(["local", "stagnant", "advective", "unclassified"]).toContain(rec.label);
      expect(rec).toHaveProperty("sunsetUtc");
      expect(rec).toHaveProperty("civilDuskUtc");
      expect(rec).toHaveProperty("rule");
      expect(Array.isArray(rec.reasons)).toBe(true);
      const m = rec.metrics as Record<string, unknown>;
      for (const k of ["sigmaWAfternoon", "sigmaWEvening", "ustarEvening", "windSpeedEvening", "wdShiftDeg", "sigmaThetaEvening", "zetaEvening", "hZeroCrossingMinutes", "coverage"]) {
        expect(m).toHaveProperty(k);
      }
      if (rec.sunsetUtc !== null) expect(Number.isNaN(Date.parse(rec.sunsetUtc as string))).toBe(false);
    }
    // The generator knows what kind each evening is: the labels should mostly agree.
    const kindOf = new Map(truth.map((t) => [t.date, t.kind]));
    const agree = records.filter((x) => x.label === kindOf.get(x.date as string)).length / records.length;
    expect(agree).toBeGreaterThanOrEqual(0.85);
  });

  test("CSV output has a header and one line per evening", async () => {
    const r = await cli(["--input", file, ...siteArgs, "--format", "csv"]);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split("\n");
    expect(lines[0]?.split(",").slice(0, 5)).toEqual(["date", "label", "rule", "sunsetUtc", "civilDuskUtc"]);
    expect(lines).toHaveLength(truth.length + 1);
  });

  test("bad input exits 2 naming the file, the line and the problem", async () => {
    const bad = join(dir, "bad.csv");
    writeFileSync(bad, "TIMESTAMP_START,TIMESTAMP_END,WS\n202101010000,202101010030,1\n202101010030,202101010100,2\nnot-a-time,202101010130,3\n");
    const r = await cli(["--input", bad, ...siteArgs]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(bad);
    expect(r.stderr).toContain("line 4");
    expect(r.stderr).toContain('cannot read the timestamp "not-a-time"');
    expect(r.stdout).toBe("");

    const noTs = join(dir, "nots.csv");
    writeFileSync(noTs, "WS,TA\n1,2\n");
    const r2 = await cli(["--input", noTs, ...siteArgs]);
    expect(r2.code).toBe(2);
    expect(r2.stderr).toMatch(/nots\.csv: line 1: no header with a timestamp column/);

    const missing = await cli(["--input", join(dir, "absent.csv"), ...siteArgs]);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/absent\.csv: no such file/);

    const rules = join(dir, "rules.json");
    writeFileSync(rules, JSON.stringify({ id: 1 }));
    const r3 = await cli(["--input", file, ...siteArgs, "--rules", rules]);
    expect(r3.code).toBe(2);
    expect(r3.stderr).toMatch(/rules\.json: invalid rule set/);
  });

  test("usage errors exit 2; --help prints usage", async () => {
    const r = await cli(["--input", file, "--lat", "47"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--lon is required/);
    const h = await cli(["--help"]);
    expect(h.code).toBe(0);
    expect(h.stdout).toMatch(/screening aids/);
  });
});
