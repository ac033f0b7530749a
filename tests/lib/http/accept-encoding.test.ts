import { describe, expect, test } from "vitest";
import { acceptsGzip } from "@/lib/http/respond";

const ask = (value?: string) => new Request("http://localhost/", { headers: value === undefined ? {} : { "accept-encoding": value } });

// Accept-Encoding as RFC 9110 section 12.5.3 defines it.
describe("acceptsGzip", () => {
  test.each([
    [undefined, false],
    ["", false],
    ["identity", false],
    ["gzip", true],
    ["GZIP", true],
    ["gzip, deflate, br, zstd", true], // what browsers send
    ["br;q=1.0, gzip;q=0.8, *;q=0.1", true],
    ["gzip;q=0", false],
    ["gzip; q=0.000", false],
    ["x-gzip", true],
    ["*", true],
    ["*;q=0", false],
    ["gzip;q=0, *", false], // gzip named and refused: the star does not bring it back
    ["br, *;q=0.5", true],
    ["deflate, br", false],
  ])("%j -> %s", (value, expected) => {
    expect(acceptsGzip(ask(value))).toBe(expected);
  });
});
