/*
 * The browser-side preview and mapping helpers (pure; the page runs them on File.slice text).
 */
import { describe, expect, test } from "vitest";
import { initialMapping, mappingFromRows, mappingProblems, previewFile } from "@/features/imports/preview";
import { syntheticCsv } from "@/tests/features/imports/helpers";

describe("previewFile", () => {
  test("finds the header, a units row and the first rows; drops a cut last line", () => {
    const text = "site: invented\nTIMESTAMP_START,TIMESTAMP_END,WS,PA,Foo\nYYYYMMDDHHMM,YYYYMMDDHHMM,m/s,hPa,\n202201010000,202201010030,1.2,960.1,3\n202201010030,202201010100,1.4,96";
    const p = previewFile(text, true);
    expect(p.problem).toBeNull();
    expect(p.headerLine).toBe(2);
    expect(p.unitsRow?.[3]).toBe("hPa");
    expect(p.rows).toEqual([["202201010000", "202201010030", "1.2", "960.1", "3"]]);
    expect(p.guesses.map((g) => g.variable)).toEqual(["TIMESTAMP_START", "TIMESTAMP_END", "WS", "PA", null]);
  });

  test("semicolons, BOM and CRLF", () => {
    const p = previewFile("\uFEFFTIMESTAMP;TA\r\n2022-01-01 00:30;1.5\r\n", false);
    expect(p.delimiter).toBe(";");
    expect(p.headers).toEqual(["TIMESTAMP", "TA"]);
    expect(p.rows).toEqual([["2022-01-01 00:30", "1.5"]]);
  });

  test.each([
    ["", /empty/],
    ["\u0000\u0001\u0002binary", /not look like a text file/],
    ["A,B\n1,2\n", /No timestamp column/],
  ])("refuses %j with a message", (text, message) => {
    expect(previewFile(text, false).problem).toMatch(message);
  });
});

describe("mapping", () => {
  test("recognised columns are chosen, a gap-filled duplicate is left out, the template wins", () => {
    const p = previewFile("TIMESTAMP_START,TIMESTAMP_END,TA,TA_F,Temp probe\n202201010000,202201010030,1,1,2\n", false);
    const rows = initialMapping(p, null);
    expect(rows.map((r) => r.target)).toEqual(["TIMESTAMP_START", "TIMESTAMP_END", "TA", "", ""]);
    const withTemplate = initialMapping(p, { columns: { "Temp probe": { variable: "TS", unit: "degC" }, TA: null } });
    expect(withTemplate.map((r) => r.target)).toEqual(["TIMESTAMP_START", "TIMESTAMP_END", "", "", "TS"]);
    expect(mappingFromRows(withTemplate)).toMatchObject({ TA: null, "Temp probe": { variable: "TS", unit: "degC" } });
  });

  test("problems: no timestamp, nothing to read, a target used twice", () => {
    expect(mappingProblems([{ header: "A", target: "WS", unit: "" }])).toEqual([expect.stringMatching(/timestamp/)]);
    expect(mappingProblems([{ header: "T", target: "TIMESTAMP", unit: "" }])).toEqual([expect.stringMatching(/at least one column/)]);
    expect(mappingProblems([
      { header: "T", target: "TIMESTAMP", unit: "" },
      { header: "a", target: "WS", unit: "" },
      { header: "b", target: "WS", unit: "" },
    ])).toEqual(['"a" and "b" are both mapped to WS.']);
  });

  test("a synthetic file's head previews without problems", () => {
    const p = previewFile(syntheticCsv(2).slice(0, 2000), true);
    expect(p.problem).toBeNull();
    expect(mappingProblems(initialMapping(p, null))).toEqual([]);
  });
});
