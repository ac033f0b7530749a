/*
 * A corpus of bad and hostile uploads through the real upload path: the POST route handler of
 * /api/sites/:id/imports in-process (FakeClient), then the import job run to its end. Each case
 * gets a clear 4xx answer or a clear import report (refused with a reason, or landed with its
 * rejected cells listed); never a 500, nothing partial stored, and the server keeps answering.
 * The 21 awkward files of tests/features/imports/malformed.test.ts are not repeated here.
 * All tower data is SYNTHETIC (lib/synthetic) or hand-made.
 */
import { gzipSync, deflateRawSync } from "node:zlib";
import { describe, expect, test } from "vitest";
import { GET, POST } from "@/app/api/sites/[siteId]/imports/route";
import { db } from "@/lib/db/knex";
import { getImport } from "@/features/imports/server/queries";
import { cleanFileName } from "@/features/imports/server/upload";
import type { ImportReport, ImportSettings } from "@/features/imports/schemas";
import { analystWithSite, BASE, drain, eveningCount, halfHourCount, syntheticCsv, type UploadBody } from "@/tests/features/imports/helpers";
import { clientFor, createUserWithGroup } from "@/tests/support/db";
import type { FakeClient } from "@/tests/support/next";

const GOOD = syntheticCsv(2); // 96 half-hours, TIMESTAMP_START/END + 14 variables
const LINES = GOOD.trimEnd().split("\n");
const HEADER = LINES[0] as string;
const DATA = LINES.slice(1);
const csv = (lines: string[], eol = "\n") => lines.join(eol) + eol;
const col = (name: string) => HEADER.split(",").indexOf(name);
const mapCells = (lines: string[], name: string, f: (v: string, i: number) => string) =>
  lines.map((l, i) => {
    const c = l.split(",");
    c[col(name)] = f(c[col(name)] as string, i);
    return c.join(",");
  });
/** Timestamps of the synthetic file moved by `years`. */
const shiftYears = (lines: string[], years: number) => lines.map((l) => l.replace(/\b(20\d\d)(\d{8})\b/g, (_, y: string, rest: string) => `${Number(y) + years}${rest}`));
const withMinutes = (step: number, n: number) => {
  const out = ["TIMESTAMP_END,WS,TA,USTAR"];
  for (let i = 1; i <= n; i++) {
    const d = new Date(Date.UTC(2022, 5, 1) + i * step * 60_000 + 3_600_000).toISOString();
    out.push(`${d.slice(0, 16).replace(/[-T:]/g, "")},${(1 + (i % 5) / 10).toFixed(1)},${(15 + (i % 3)).toFixed(1)},0.2`);
  }
  return csv(out);
};
const utf16le = (text: string) => {
  const b = Buffer.alloc(2 + text.length * 2);
  b[0] = 0xff;
  b[1] = 0xfe;
  b.write(text, 2, "utf16le");
  return new Uint8Array(b);
};
/** A zip archive with one stored-deflated member of `size` zero bytes (a small "bomb"). */
function zipOfZeros(size: number): Uint8Array {
  const data = deflateRawSync(Buffer.alloc(size));
  const name = Buffer.from("tower.csv");
  const local = Buffer.alloc(30);
  local.writeUInt32LE(0x04034b50, 0);
  local.writeUInt16LE(20, 4);
  local.writeUInt16LE(8, 8);
  local.writeUInt32LE(data.length, 18);
  local.writeUInt32LE(size, 22);
  local.writeUInt16LE(name.length, 26);
  return new Uint8Array(Buffer.concat([local, name, data]));
}

type Report = ImportReport;
type Expect = { http: number; code?: string } | "refused" | "landed";
type Case = {
  name: string;
  /** A file sent in the part "file" as a browser does, or a hand-made request. */
  content?: string | Uint8Array;
  fileName?: string;
  settings?: ImportSettings;
  request?: (siteId: number) => Request;
  expect: Expect;
  check?: (r: { report: Report | null; body: UploadBody; rows: number; originalName: string | null }) => void;
};

const url = (siteId: number) => `${BASE}/api/sites/${siteId}/imports`;
function formWith(parts: [string, string | Blob, string?][]): FormData {
  const form = new FormData();
  for (const [name, value, file] of parts) {
    if (typeof value === "string") form.append(name, value);
    else form.append(name, value, file);
  }
  return form;
}
const blob = (s: string | Uint8Array, type = "text/csv") => new Blob([typeof s === "string" ? s : Buffer.from(s)], { type });
/** A multipart body written by hand, for framing FormData will not produce. */
function rawMultipart(siteId: number, body: string, boundary = "XyZzY"): Request {
  return new Request(url(siteId), { method: "POST", body, headers: { "content-type": `multipart/form-data; boundary=${boundary}` } });
}
const refusedWith = (re: RegExp) => ({ report }: { report: Report | null }) => expect(report?.refusal?.message).toMatch(re);

const cases: Case[] = [
  // ---- the request itself
  { name: "no body, wrong content-type (JSON)", request: (id) => new Request(url(id), { method: "POST", body: JSON.stringify({ file: GOOD }), headers: { "content-type": "application/json" } }), expect: { http: 415, code: "unsupported_media_type" } },
  { name: "raw CSV body as text/csv", request: (id) => new Request(url(id), { method: "POST", body: GOOD, headers: { "content-type": "text/csv" } }), expect: { http: 415 } },
  { name: "no content-type at all", request: (id) => new Request(url(id), { method: "POST", body: new Uint8Array(Buffer.from(GOOD)) }), expect: { http: 415 } },
  { name: "multipart without a boundary", request: (id) => new Request(url(id), { method: "POST", body: "--x\r\n\r\n", headers: { "content-type": "multipart/form-data" } }), expect: { http: 400, code: "bad_multipart" } },
  { name: "multipart that ends in the middle of the file", request: (id) => rawMultipart(id, `--XyZzY\r\nContent-Disposition: form-data; name="file"; filename="t.csv"\r\nContent-Type: text/csv\r\n\r\n${HEADER}\n${DATA[0]}`), expect: { http: 400, code: "bad_multipart" } },
  { name: "multipart of garbage bytes", request: (id) => rawMultipart(id, "\u0000\u0001garbage\r\n--nope--"), expect: { http: 400, code: "bad_multipart" } },
  { name: "no file, only a mapping", request: (id) => new Request(url(id), { method: "POST", body: formWith([["mapping", "{}"]]) }), expect: { http: 422, code: "no_file" } },
  { name: "the file in a part with another name", request: (id) => new Request(url(id), { method: "POST", body: formWith([["upload", blob(GOOD), "t.csv"]]) }), expect: { http: 422, code: "no_file" } },
  { name: "two files in one upload", request: (id) => new Request(url(id), { method: "POST", body: formWith([["file", blob(GOOD), "a.csv"], ["file", blob(syntheticCsv(1, { seed: 3 })), "b.csv"]]) }), expect: { http: 422, code: "too_many_files" } },
  {
    name: "Content-Length claims 5 GB",
    request: (id) => new Request(url(id), { method: "POST", body: formWith([["file", blob(GOOD), "t.csv"]]), headers: { "content-length": String(5 * 1024 ** 3) } }),
    expect: { http: 413, code: "too_large" },
  },
  { name: "mapping that is not JSON", content: GOOD, request: (id) => new Request(url(id), { method: "POST", body: formWith([["mapping", "{columns:"], ["file", blob(GOOD), "t.csv"]]) }), expect: { http: 422 } },
  { name: "mapping with impossible values", request: (id) => new Request(url(id), { method: "POST", body: formWith([["mapping", JSON.stringify({ utcOffsetHours: 99, missingCodes: "all" })], ["file", blob(GOOD), "t.csv"]]) }), expect: { http: 422 } },
  {
    name: "mapping with __proto__ and constructor keys",
    request: (id) => new Request(url(id), { method: "POST", body: formWith([["mapping", '{"__proto__":{"polluted":1},"columns":{"constructor":{"variable":"WS"},"__proto__":null}}'], ["file", blob(GOOD), "t.csv"]]) }),
    expect: "landed",
    check: () => expect(({} as Record<string, unknown>).polluted).toBeUndefined(),
  },
  { name: "a 300 kB mapping field (over the field limit)", request: (id) => new Request(url(id), { method: "POST", body: formWith([["mapping", JSON.stringify({ missingCodes: ["x".repeat(300_000)] })], ["file", blob(GOOD), "t.csv"]]) }), expect: { http: 413, code: "field_too_large" } },

  // ---- file names
  { name: "path traversal in the file name", content: GOOD, fileName: "../../etc/passwd", expect: "landed", check: ({ originalName }) => expect(originalName).not.toContain("..") },
  { name: "Windows path in the file name", content: syntheticCsv(2, { seed: 11 }), fileName: "C:\\Users\\x\\..\\..\\boot.ini", expect: "landed", check: ({ originalName }) => expect(originalName).not.toMatch(/[\\/]/) },
  { name: "a 5,000-character file name ending in emoji", content: syntheticCsv(2, { seed: 12 }), fileName: `${"a".repeat(254)}${"\u{1F32B}".repeat(2500)}.csv`, expect: "landed", check: ({ originalName }) => expect([...(originalName ?? "")].length).toBeLessThanOrEqual(255) },
  { name: "markup in the file name", content: syntheticCsv(2, { seed: 13 }), fileName: "<img src=x onerror=window.__pwned=1>.csv", expect: "landed", check: ({ originalName }) => expect(originalName).toBe("<img src=x onerror=window.__pwned=1>.csv") },
  { name: "control characters in the file name", content: syntheticCsv(2, { seed: 14 }), fileName: "tower\u0007\u001b[31m.csv", expect: { http: 400, code: "bad_multipart" } },
  { name: "a NUL byte in the file name", content: syntheticCsv(2, { seed: 15 }), fileName: "tower\u0000.csv", expect: { http: 400, code: "bad_multipart" } },

  // ---- not a table
  { name: "gzip-compressed table", content: new Uint8Array(gzipSync(GOOD)), expect: "refused", check: refusedWith(/gzip/i) },
  { name: "gzip bomb (200 MB of zeros)", content: new Uint8Array(gzipSync(Buffer.alloc(200_000_000))), expect: "refused", check: refusedWith(/gzip/i) },
  { name: "zip bomb-ish archive (100 MB of zeros)", content: zipOfZeros(100_000_000), expect: "refused", check: refusedWith(/zip/i) },
  { name: "a PDF", content: "%PDF-1.7\n%\u00e2\u00e3\n1 0 obj << /Type /Catalog >> endobj\n", expect: "refused", check: refusedWith(/PDF/) },
  { name: "an HTML page", content: "<!doctype html><html><head><title>Not found</title></head><body><script>window.__pwned=1</script></body></html>\n", expect: "refused", check: refusedWith(/timestamp/) },
  { name: "a JSON document", content: JSON.stringify({ rows: [{ TIMESTAMP: "2022-06-01T00:30", WS: 1 }] }), expect: "refused", check: refusedWith(/timestamp/) },
  { name: "only blank lines and spaces", content: "\n \n\t\n\r\n   \n", expect: "refused", check: refusedWith(/empty|no header/) },
  { name: "only NUL bytes", content: new Uint8Array(8192), expect: "refused" },
  { name: "10 MB on a single line", content: `TIMESTAMP,WS,${"1".repeat(10_000_000)}`, expect: "refused", check: ({ report }) => expect(report?.refusal).toMatchObject({ row: 1, message: expect.stringMatching(/longer than/) }) },
  { name: "an .xls (OLE) document", content: Uint8Array.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1, ...new Array(600).fill(0)]), expect: "refused", check: refusedWith(/\.xls/) },
  {
    name: "a quote never closed",
    content: csv([HEADER, ...DATA.slice(0, 3), `"${DATA[3]}`, ...DATA.slice(4)]),
    expect: "refused",
    check: ({ report }) => {
      expect(report?.refusal?.row).toBe(5);
      expect(report?.refusal?.message).toMatch(/quote left open/);
      expect(report?.refusal?.message.length).toBeLessThan(400);
    },
  },

  // ---- encodings and line ends
  { name: "UTF-16 with a byte-order mark", content: utf16le(syntheticCsv(2, { seed: 21 })), expect: "landed", check: ({ rows }) => expect(rows).toBe(96) },
  { name: "Latin-1 units row (degree sign)", content: Uint8Array.from(csv(["TIMESTAMP_END,TA,WS", "YYYYMMDDHHMM,\u00b0C,m/s", "202206010030,12.5,1.0", "202206010100,12.4,1.1", "202206010130,12.1,0.9"]), (c) => c.charCodeAt(0)), expect: "landed", check: ({ report }) => expect(report?.warnings.join(" ")).toMatch(/not UTF-8/) },
  { name: "CR-only line ends", content: csv([HEADER, ...shiftYears(DATA, -1)], "\r"), expect: "landed", check: ({ rows }) => expect(rows).toBe(96) },
  { name: "NUL bytes inside cells", content: csv([HEADER, ...mapCells(shiftYears(DATA, -2), "WS", (v, i) => (i % 10 === 0 ? `${v}\u0000` : v))]), expect: "landed", check: ({ report }) => expect(report?.columns.find((c) => c.variable === "WS")?.notNumeric).toBe(10) },

  // ---- columns and units
  { name: "duplicate columns", content: csv([`${HEADER},WS`, ...shiftYears(DATA, -3).map((l) => `${l},9.9`)]), expect: "landed", check: ({ report }) => expect(report?.ignored.some((c) => c.header === "WS")).toBe(true) },
  { name: "unknown unit in the header", content: csv([HEADER.replace(",WS,", ",WS [furlong/fortnight],"), ...shiftYears(DATA, -4)]), expect: "landed", check: ({ report }) => expect(report?.warnings.join(" ")).toMatch(/furlong/) },
  { name: "HTML and script in headers", content: csv([`${HEADER},<script>window.__pwned=1</script>,<img src=x onerror=alert(1)>`, ...shiftYears(DATA, -5).map((l) => `${l},1,2`)]), expect: "landed", check: ({ report }) => expect(report?.ignored.map((c) => c.header)).toEqual(expect.arrayContaining(["<script>window.__pwned=1</script>", "<img src=x onerror=alert(1)>"])) },
  { name: "formula as a header", content: csv([`${HEADER},=cmd|' /C calc'!A0`, ...shiftYears(DATA, -6).map((l) => `${l},1`)]), expect: "landed", check: ({ report }) => expect(report?.ignored.some((c) => c.header.startsWith("=cmd"))).toBe(true) },
  { name: "formulas in cells", content: csv([HEADER, ...mapCells(shiftYears(DATA, -7), "TA", (v, i) => (i < 5 ? "=cmd|' /C calc'!A0" : i < 8 ? "@SUM(1+1)" : v))]), expect: "landed", check: ({ report }) => expect(report?.rejectedSample.filter((r) => r.column === "TA").map((r) => r.value)).toEqual(expect.arrayContaining(["=cmd|' /C calc'!A0", "@SUM(1+1)"])) },
  { name: "5,000 columns", content: csv([`${HEADER},${Array.from({ length: 5000 }, (_, i) => `X${i}`).join(",")}`, ...shiftYears(DATA, -8).map((l) => `${l}${",0".repeat(5000)}`)]), expect: "landed", check: ({ report }) => expect(report?.ignored.length).toBeGreaterThanOrEqual(5000) },
  { name: "the header again in the middle (two files pasted together)", content: csv([HEADER, ...shiftYears(DATA, -9).slice(0, 40), HEADER, ...shiftYears(DATA, -9).slice(40)]), expect: "refused", check: ({ report }) => expect(report?.refusal?.row).toBe(42) },

  // ---- values
  { name: "-9999 fill value everywhere", content: csv([HEADER, ...shiftYears(DATA, -10).map((l) => l.split(",").map((c, i) => (i < 2 ? c : "-9999")).join(","))]), expect: "landed", check: ({ report }) => expect(report?.columns.every((c) => c.read === 0)).toBe(true) },
  { name: "decimal commas in a semicolon file", content: csv([HEADER.replace(/,/g, ";"), ...shiftYears(DATA, -11).map((l) => l.replace(/,/g, ";").replace(/(\d)\.(\d)/g, "$1,$2"))]), expect: "landed", check: ({ report }) => expect(report?.columns.find((c) => c.variable === "TA")?.read ?? 0).toBeGreaterThan(0) },
  { name: "decimal commas mixed into a comma file", content: csv([HEADER, ...shiftYears(DATA, -12).map((l, i) => (i % 7 === 0 ? l.replace(/(\d)\.(\d)/, "$1,$2") : l))]), expect: "landed", check: ({ report }) => expect(report?.warnings.join(" ")).toMatch(/different number of fields/) },
  { name: "1e308 and -0 and hex numbers", content: csv([HEADER, ...mapCells(shiftYears(DATA, -13), "H", (v, i) => ["1e308", "-0", "0x1F", "1e-400", v][i % 5] as string)]), expect: "landed", check: ({ report }) => expect(report?.columns.find((c) => c.variable === "H")?.outOfRange).toBeGreaterThan(0) },

  // ---- time
  { name: "timestamps in the future (2090s)", content: csv([HEADER, ...shiftYears(DATA, 70)]), expect: "refused", check: refusedWith(/every row starts in the future/) },
  { name: "a few rows in the future", content: csv([HEADER, ...shiftYears(DATA, -17).slice(0, 90), ...shiftYears(DATA, 70).slice(90)]), expect: "landed", check: ({ report, rows }) => { expect(rows).toBe(90); expect(report?.warnings.join(" ")).toMatch(/6 rows start in the future/); } },
  { name: "timestamps before the Common Era's second millennium (year 0022)", content: csv([HEADER, ...DATA.map((l) => l.replace(/\b2022(\d{8})\b/g, "0022$1"))]), expect: "refused", check: refusedWith(/cannot read the timestamp "0022/) },
  { name: "every row twice", content: csv([HEADER, ...shiftYears(DATA, -14).flatMap((l) => [l, l])]), expect: "landed", check: ({ report, rows }) => { expect(report?.duplicates).toBe(96); expect(rows).toBe(96); } },
  { name: "rows in reverse order", content: csv([HEADER, ...shiftYears(DATA, -15).reverse()]), expect: "landed", check: ({ report, rows }) => { expect(report?.outOfOrder).toBeGreaterThan(0); expect(rows).toBe(96); } },
  { name: "hourly, not half-hourly", content: withMinutes(60, 72), expect: "landed", check: ({ report }) => expect(report?.periodMinutes).toBe(60) },
  { name: "ten-minute steps", content: withMinutes(10, 300).replace(/2022/g, "2023"), expect: "landed", check: ({ report }) => expect(report?.periodMinutes).toBe(10) },
  { name: "every TIMESTAMP_END before its START", content: csv([HEADER, ...shiftYears(DATA, -16).map((l) => { const [a, b, ...rest] = l.split(","); return [b, a, ...rest].join(","); })]), expect: "refused", check: refusedWith(/TIMESTAMP_END/) },
];

async function send(client: FakeClient, siteId: number, c: Case): Promise<{ res: Response; body: UploadBody }> {
  const request =
    c.request?.(siteId) ??
    new Request(url(siteId), {
      method: "POST",
      body: formWith([...(c.settings ? ([["mapping", JSON.stringify(c.settings)]] as [string, string][]) : []), ["file", blob(c.content ?? ""), c.fileName ?? `${c.name}.csv`]]),
    });
  const res = await client.call(() => POST(request, { params: Promise.resolve({ siteId: String(siteId) }) }));
  return { res, body: (await res.json()) as UploadBody };
}

async function importRows(siteId: number): Promise<number> {
  const r = (await db("imports").where({ site_id: siteId }).count({ n: "*" }).first()) as { n: number | string };
  return Number(r.n);
}

describe("a corpus of hostile uploads through the real upload path", () => {
  test("there are at least 40 of them", () => {
    expect(cases.length).toBeGreaterThanOrEqual(40);
    expect(new Set(cases.map((c) => c.name)).size).toBe(cases.length);
  });

  test.each(cases)("$name", { timeout: 120_000 }, async (c) => {
    const { client, site } = await analystWithSite();
    const { res, body } = await send(client, site.id, c);
    expect(res.status, JSON.stringify(body)).toBeLessThan(500);
    let report: Report | null = null;
    let originalName: string | null = null;
    if (typeof c.expect === "object") {
      expect(res.status, JSON.stringify(body)).toBe(c.expect.http);
      if (c.expect.code) expect(body.error?.code).toBe(c.expect.code);
      expect(body.error?.message.length).toBeGreaterThan(10);
      expect(body.error?.message).not.toMatch(/\bat .*\.(ts|js):\d+|ER_|SQL/);
      expect(await importRows(site.id)).toBe(0);
    } else {
      expect(res.status, JSON.stringify(body)).toBe(202);
      const job = await drain(Number(body.jobId));
      const imp = await getImport(site.id, Number(body.importId));
      expect(imp?.status, JSON.stringify(imp?.report?.refusal ?? job.message)).toBe(c.expect);
      report = imp?.report ?? null;
      originalName = imp?.originalName ?? null;
      expect(report).not.toBeNull();
      if (c.expect === "refused") {
        expect(job.status).toBe("failed");
        expect(report?.refusal?.message.length).toBeGreaterThan(5);
        expect(job.message).toMatch(/^Refused: .*Nothing was written\.$/);
      } else {
        expect(job.status).toBe("done");
        expect(await halfHourCount(site.id)).toBe(imp?.rowsWritten);
      }
    }
    const rows = await halfHourCount(site.id);
    if (c.expect !== "landed") {
      expect(rows).toBe(0);
      expect(await eveningCount(site.id)).toBe(0);
    }
    c.check?.({ report, body, rows, originalName });
    // The server keeps answering.
    const after = await client.call(() => GET(new Request(url(site.id)), { params: Promise.resolve({ siteId: String(site.id) }) }));
    expect(after.status).toBe(200);
  });

  test("file names are cut to their last segment, without control characters, within 255 characters", () => {
    expect(cleanFileName("../../etc/passwd")).toBe("passwd");
    expect(cleanFileName("C:\\x\\..\\boot.ini")).toBe("boot.ini");
    expect(cleanFileName("tower\u0007\u001b[31m\u0085.csv")).toBe("tower[31m.csv");
    expect(cleanFileName("..")).toBe("upload.csv");
    expect(cleanFileName(undefined)).toBe("upload.csv");
    const long = cleanFileName(`${"a".repeat(254)}${"\u{1F32B}".repeat(10)}`);
    expect(long).toBe("a".repeat(254));
    expect(cleanFileName(`${"a".repeat(253)}${"\u{1F32B}".repeat(10)}`)).toBe(`${"a".repeat(253)}\u{1F32B}`);
  });

  test("anonymous and viewer uploads are refused before a byte is stored", async () => {
    const { site } = await analystWithSite();
    const { user } = await createUserWithGroup({ role: "viewer" });
    const viewer = await clientFor(user);
    const r = await send(viewer, site.id, { name: "viewer", content: GOOD, expect: { http: 404 } });
    expect([403, 404]).toContain(r.res.status);
    expect(await importRows(site.id)).toBe(0);
  });

  test("after the whole corpus a good file still imports", async () => {
    const { client, site } = await analystWithSite();
    const { res, body } = await send(client, site.id, { name: "good", content: syntheticCsv(2, { seed: 99 }), expect: "landed" });
    expect(res.status).toBe(202);
    expect((await drain(Number(body.jobId))).status).toBe("done");
    expect(await halfHourCount(site.id)).toBe(96);
  });
});
