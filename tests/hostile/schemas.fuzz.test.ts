/*
 * Fuzzing of every zod schema of the app. The schemas are found by importing
 * features/<name>/schemas.ts and every lib module that imports zod, and keeping the exports
 * that are zod types; a schema that FUZZ does not list fails the coverage test, so a new schema
 * cannot slip past. For each: arbitrary values (fc.anything, fc.object, form-like string records)
 * give a result, never a throw; a failure is a ZodError with readable messages; valid
 * generated inputs parse.
 */
import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { ZodError, prettifyError, type ZodType } from "zod";
import { DEFAULT_RULE_SET, parseRuleSet } from "@/lib/classify/rules";

const ROOT = path.resolve(__dirname, "../..");

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name);
    return statSync(full).isDirectory() ? walk(full) : /\.tsx?$/.test(name) ? [full] : [];
  });
}

/** Source files that may hold schemas: every features/x/schemas.ts and lib modules importing zod. */
function schemaModules(): string[] {
  const features = readdirSync(path.join(ROOT, "features"))
    .map((f) => path.join(ROOT, "features", f, "schemas.ts"))
    .filter((f) => {
      try {
        return statSync(f).isFile();
      } catch {
        return false;
      }
    });
  const lib = walk(path.join(ROOT, "lib")).filter((f) => /from ["']zod["']/.test(readFileSync(f, "utf8")));
  return [...features, ...lib].map((f) => path.relative(ROOT, f).split(path.sep).join("/")).sort();
}

function isZod(v: unknown): v is ZodType {
  return typeof v === "object" && v !== null && "_zod" in v && typeof (v as { safeParse?: unknown }).safeParse === "function";
}

async function discover(): Promise<Map<string, ZodType>> {
  const found = new Map<string, ZodType>();
  for (const rel of schemaModules()) {
    const mod = (await import(path.join(ROOT, rel))) as Record<string, unknown>;
    for (const [name, value] of Object.entries(mod)) if (isZod(value)) found.set(`${rel}#${name}`, value);
  }
  return found;
}

// Generators of valid inputs (as forms and JSON send them).
const pos = fc.integer({ min: 1, max: 2 ** 31 - 1 });
const posText = pos.map(String);
const isoDay = fc.date({ min: new Date("1990-01-01T00:00:00Z"), max: new Date("2089-12-31T00:00:00Z"), noInvalidDate: true }).map((d) => d.toISOString().slice(0, 10));
const dayPair = (maxDays: number) =>
  fc.tuple(isoDay, fc.integer({ min: 0, max: maxDays })).map(([from, n]) => ({ from, to: new Date(Date.parse(`${from}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10) }));
const text = (min: number, max: number) => fc.string({ minLength: min, maxLength: max, unit: "grapheme" }).filter((s) => s.trim().length >= min && s.length <= max);
const email = fc.stringMatching(/^[a-z0-9]{1,20}(\.[a-z0-9]{1,10})?@[a-z0-9]{1,20}\.[a-z]{2,6}$/);
const label = fc.constantFrom("local", "stagnant", "advective", "unclassified");
const role = fc.constantFrom("lead", "analyst", "viewer");
const password = fc.string({ minLength: 10, maxLength: 256 });
const markup = fc.constantFrom("<img src=x onerror=window.__pwned=1>", "<script>window.__pwned=1</script>", '"><svg onload=alert(1)>', "=cmd|' /C calc'!A0");

/**
 * Every schema with its valid inputs; `null` where a valid input cannot be built independently
 * (a schema whose meaning is only "any of these", or not meaningful alone).
 */
const FUZZ: Record<string, fc.Arbitrary<unknown> | null> = {
  "features/account/schemas.ts#createTokenSchema": fc.record({ name: fc.oneof(text(1, 80), markup) }),
  "features/account/schemas.ts#revokeTokenSchema": fc.record({ tokenId: posText }),
  "features/agreement/schemas.ts#agreementQuerySchema": fc.record({ site: posText, from: fc.option(isoDay), auto: fc.option(label), final: fc.constantFrom("", "local") }, { requiredKeys: ["site"] }),
  "features/anomalies/schemas.ts#anomalyRangeSchema": dayPair(400),
  "features/anomalies/schemas.ts#anomalyFiltersSchema": fc.record({ series: fc.string({ maxLength: 40 }), page: fc.integer({ min: 1, max: 10_000 }).map(String), label: label }, { requiredKeys: [] }),
  "features/anomalies/schemas.ts#anomalyJobPayloadSchema": null,
  "features/auth/schemas.ts#signInSchema": fc.record({ email, password: fc.string({ minLength: 1, maxLength: 256 }) }),
  "features/auth/schemas.ts#signUpSchema": fc.record({ email, password, displayName: fc.oneof(text(1, 120), markup), groupName: fc.oneof(text(1, 120), markup) }),
  "features/exports/schemas.ts#exportQuerySchema": fc.tuple(dayPair(3000), fc.constantFrom("0", "1", "true", "false", "on", "")).map(([r, h]) => ({ ...r, halfHours: h })),
  "features/imports/schemas.ts#mappingEntrySchema": fc.oneof(fc.constant(null), fc.record({ variable: fc.stringMatching(/^[A-Za-z][A-Za-z0-9_]{0,39}$/) })),
  "features/imports/schemas.ts#overlapChoiceSchema": fc.constantFrom("cancel", "replace", "keep"),
  "features/imports/schemas.ts#overlapSettingSchema": fc.constantFrom("ask", "cancel", "replace", "keep"),
  "features/imports/schemas.ts#importSettingsSchema": fc.record(
    {
      columns: fc.dictionary(fc.string({ maxLength: 200 }), fc.oneof(fc.constant(null), fc.record({ variable: fc.constantFrom("WS", "TA", "TIMESTAMP_END", "O3") }))),
      missingCodes: fc.array(fc.string({ maxLength: 20 }), { maxLength: 20 }),
      timestampConvention: fc.constantFrom("start", "end"),
      utcOffsetHours: fc.integer({ min: -56, max: 56 }).map((q) => q / 4),
      overlap: fc.constantFrom("ask", "cancel"),
      saveTemplate: fc.boolean(),
    },
    { requiredKeys: [] },
  ),
  "features/imports/schemas.ts#templateSchema": fc.record({ missingCodes: fc.array(fc.string({ maxLength: 20 }), { maxLength: 20 }) }, { requiredKeys: [] }),
  "features/imports/schemas.ts#resolveOverlapSchema": fc.record({ importId: posText, choice: fc.constantFrom("cancel", "replace", "keep") }),
  "features/imports/schemas.ts#recomputeSchema": fc.tuple(posText, dayPair(5000)).map(([siteId, r]) => ({ siteId, ...r })),
  "features/notices/schemas.ts#preferencesSchema": fc.record({ importNotices: fc.constantFrom("on", undefined), weeklyDigest: fc.constantFrom("on", undefined) }),
  "features/recovery/schemas.ts#requestResetSchema": fc.record({ email }),
  "features/recovery/schemas.ts#newPasswordSchema": password.map((p) => ({ password: p, confirm: p })),
  "features/review/schemas.ts#labelSchema": label,
  "features/review/schemas.ts#dateSchema": isoDay,
  "features/review/schemas.ts#rangeSchema": dayPair(800),
  "features/review/schemas.ts#noteSchema": fc.oneof(text(1, 2000), markup),
  "features/review/schemas.ts#overrideInputSchema": fc.record({ label, note: fc.oneof(text(1, 2000), markup), version: pos }),
  "features/review/schemas.ts#revertInputSchema": fc.record({ version: pos, note: fc.oneof(text(1, 2000), markup) }),
  "features/review/schemas.ts#reviewedInputSchema": fc.record({ version: posText }),
  "features/review/schemas.ts#idSchema": posText,
  "features/rules/schemas.ts#newVersionSchema": fc.record({ groupId: posText, name: text(1, 120), comment: text(3, 2000), definition: fc.constant(DEFAULT_RULE_SET) }),
  "features/rules/schemas.ts#previewSchema": fc.tuple(posText, dayPair(1800)).map(([siteId, r]) => ({ siteId, ...r, definition: {} })),
  "features/rules/schemas.ts#activateSchema": fc.record({ siteId: posText }),
  "features/seasons/schemas.ts#seasonQuerySchema": fc.tuple(fc.array(pos, { minLength: 1, maxLength: 20 }), dayPair(3000)).map(([ids, r]) => ({ sites: ids.join(","), ...r, scheme: "custom", seasonStart: "04-15", seasonEnd: "10-01" })),
  "features/sites/schemas.ts#siteFields": null,
  "features/sites/schemas.ts#siteInputSchema": fc
    .record({
      name: fc.oneof(text(1, 120), markup),
      latitude: fc.double({ min: -90, max: 90, noNaN: true }),
      longitude: fc.double({ min: -180, max: 180, noNaN: true }).map((v) => String(v).replace(".", ",")),
      elevationM: fc.integer({ min: -450, max: 9000 }).map(String),
      measurementHeightM: fc.integer({ min: 2, max: 500 }),
      utcOffsetHours: fc.integer({ min: -48, max: 56 }).map((q) => String(q / 4)),
      notes: fc.oneof(fc.constant(""), markup),
    })
    .map((s) => ({ ...s, canopyHeightM: String(Math.min(150, s.measurementHeightM / 2)) })),
  "features/sites/schemas.ts#groupIdSchema": posText,
  "features/sites/schemas.ts#siteIdSchema": posText,
  "features/team/schemas.ts#groupIdSchema": posText,
  "features/team/schemas.ts#invitationIdSchema": posText,
  "features/team/schemas.ts#userIdSchema": fc.stringMatching(/^[a-z0-9]{1,40}$/),
  "features/team/schemas.ts#inviteSchema": fc.record({ email, role }),
  "features/team/schemas.ts#roleChangeSchema": fc.record({ role }),
  "features/team/schemas.ts#acceptNewSchema": fc.record({ displayName: fc.oneof(text(1, 120), markup), password }),
  "features/team/schemas.ts#acceptExistingSchema": fc.record({ password: fc.string({ minLength: 1, maxLength: 256 }) }),
  "lib/classify/rules.ts#anomalySettingsSchema": fc.record({ threshold: fc.double({ min: 0.1, max: 20, noNaN: true }), minConsecutive: fc.integer({ min: 1, max: 12 }) }, { requiredKeys: [] }),
  "lib/classify/rules.ts#ruleSetSchema": fc
    .record({ version: fc.integer({ min: 1, max: 10_000 }), name: text(1, 120), calmSpeedMs: fc.double({ min: 0, max: 5, noNaN: true }) })
    .map((v) => ({ ...DEFAULT_RULE_SET, ...v })),
};

/** Messages people read: non-empty text, no JavaScript object dumps or stack lines. */
function expectReadable(error: unknown): void {
  expect(error).toBeInstanceOf(ZodError);
  const issues = (error as ZodError).issues;
  expect(issues.length).toBeGreaterThan(0);
  for (const issue of issues) {
    expect(typeof issue.message).toBe("string");
    expect(issue.message.trim().length).toBeGreaterThan(0);
    expect(issue.message.length).toBeLessThan(400);
    expect(issue.message).not.toMatch(/\[object |undefined is not|TypeError|^\s+at /);
  }
  expect(() => prettifyError(error as ZodError)).not.toThrow();
}

function checkHostile(schema: ZodType, input: unknown): void {
  let result: ReturnType<ZodType["safeParse"]>;
  try {
    result = schema.safeParse(input);
  } catch (err) {
    throw new Error(`safeParse threw ${String(err)} for ${fc.stringify(input)}`);
  }
  if (!result.success) expectReadable(result.error);
}

const formLike = fc.dictionary(
  fc.oneof(fc.constantFrom("name", "email", "password", "from", "to", "siteId", "site", "sites", "label", "note", "version", "latitude", "groupId", "definition", "columns", "__proto__", "constructor"), fc.string()),
  fc.oneof(fc.string(), markup, fc.constantFrom("", " ", "0", "-1", "1e308", "NaN", "Infinity", "2025-02-30", "9999-99-99", "0x10"), fc.integer(), fc.double(), fc.constant(null)),
);

describe("every zod schema of the app is fuzzed", () => {
  test("the fuzz list names exactly the schemas that exist", async () => {
    const found = [...(await discover()).keys()].sort();
    expect(found.length).toBeGreaterThan(30);
    expect(Object.keys(FUZZ).sort()).toEqual(found);
  });

  test("arbitrary values never throw; failures are ZodErrors with readable messages", { timeout: 120_000 }, async () => {
    const schemas = await discover();
    for (const [name, schema] of schemas) {
      const anything = fc.anything({ withBoxedValues: true, withNullPrototype: true, withMap: true, withSet: true, withBigInt: true, withDate: true, withTypedArray: true, withSparseArray: true, withObjectString: true });
      try {
        fc.assert(fc.property(fc.oneof(anything, fc.object(), formLike), (input) => checkHostile(schema, input)), { numRuns: 150, seed: 9, endOnFailure: true, examples: [[undefined], [null], [{}], [[]], [""], [Object.create(null)]] });
      } catch (err) {
        throw new Error(`${name}: ${err instanceof Error ? err.message : String(err)}`);
      }
    }
  });

  test("valid generated inputs parse", async () => {
    const schemas = await discover();
    for (const [name, arb] of Object.entries(FUZZ)) {
      if (!arb) continue;
      const schema = schemas.get(name) as ZodType;
      fc.assert(
        fc.property(arb, (input) => {
          const r = schema.safeParse(input);
          if (!r.success) throw new Error(`${name} refused ${fc.stringify(input)}: ${prettifyError(r.error)}`);
        }),
        { numRuns: 60, seed: 9 },
      );
    }
  });

  test("a rule may not name a threshold that only exists on Object.prototype", () => {
    for (const name of ["constructor", "toString", "hasOwnProperty", "__proto__"]) {
      const bad = { ...DEFAULT_RULE_SET, rules: [{ id: "odd", label: "local", description: "", all: [name] }] };
      expect(() => parseRuleSet(bad), name).toThrow(/unknown threshold/);
    }
  });
});
