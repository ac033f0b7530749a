import { describe, expect, it } from "vitest";
import { db } from "@/lib/db/knex";
import { eveningsStamp, StampedCache } from "@/lib/evenings/stamp";
import { createGroup, createSiteFor } from "@/tests/support/db";
import { insertEvenings } from "@/tests/features/review/fixtures";

describe("eveningsStamp", () => {
  it("stays while nothing changes and moves with a version bump, a new row and a deleted row", async () => {
    const site = await createSiteFor((await createGroup()).id);
    const scope = { siteIds: [site.id], from: "2025-05-01", to: "2025-05-31" };
    expect(await eveningsStamp(scope)).toBe("0.0.0");
    const [a, b] = (await insertEvenings(site.id, [{ date: "2025-05-01" }, { date: "2025-05-02" }])) as [number, number];
    const s1 = await eveningsStamp(scope);
    expect(await eveningsStamp(scope)).toBe(s1);
    await db("evenings").where({ id: a }).increment("version", 1);
    const s2 = await eveningsStamp(scope);
    expect(s2).not.toBe(s1);
    // outside the period: this period's stamp stays
    await insertEvenings(site.id, [{ date: "2025-06-01" }]);
    expect(await eveningsStamp(scope)).toBe(s2);
    const [c] = (await insertEvenings(site.id, [{ date: "2025-05-03" }])) as [number];
    const s3 = await eveningsStamp(scope);
    expect(new Set([s1, s2, s3]).size).toBe(3);
    // a row inserted and deleted again leaves the stamp of the state before it, which has the same content
    await db("evenings").where({ id: c }).delete();
    expect(await eveningsStamp(scope)).toBe(s2);
    await db("evenings").where({ id: b }).delete();
    expect(await eveningsStamp(scope)).not.toBe(s2);
  });
});

describe("StampedCache", () => {
  const entry = (stamp: string, value: string) => Promise.resolve({ stamp, value, bytes: value.length });

  it("serves an entry only at its stamp and rebuilds at any other", async () => {
    const cache = new StampedCache<string>(10, 1000);
    let builds = 0;
    const build = (stamp: string) => () => (builds++, entry(stamp, `v${stamp}`));
    expect(await cache.get("k", "1", build("1"))).toBe("v1");
    expect(await cache.get("k", "1", build("1"))).toBe("v1");
    expect(builds).toBe(1);
    expect(await cache.get("k", "2", build("2"))).toBe("v2");
    expect(builds).toBe(2);
    expect(await cache.get("k", "1", build("1"))).toBe("v1");
    expect(builds).toBe(3);
  });

  it("shares one build between concurrent misses of one key and stamp; a failed build is not kept", async () => {
    const cache = new StampedCache<string>(10, 1000);
    let builds = 0;
    const slow = () => {
      builds++;
      return new Promise<{ stamp: string; value: string; bytes: number }>((r) => setTimeout(() => r({ stamp: "1", value: "x", bytes: 1 }), 20));
    };
    expect(await Promise.all([cache.get("k", "1", slow), cache.get("k", "1", slow), cache.get("k", "1", slow)])).toEqual(["x", "x", "x"]);
    expect(builds).toBe(1);
    await expect(cache.get("f", "1", () => Promise.reject(new Error("db down")))).rejects.toThrow("db down");
    expect(await cache.get("f", "1", () => entry("1", "ok"))).toBe("ok");
  });

  it("drops the least recently used entries beyond its entry and byte limits", async () => {
    const cache = new StampedCache<string>(2, 10);
    await cache.get("a", "1", () => entry("1", "aaaa"));
    await cache.get("b", "1", () => entry("1", "bbbb"));
    await cache.get("a", "1", () => entry("1", "never"));
    await cache.get("c", "1", () => entry("1", "cccc"));
    expect(cache.size).toBe(2);
    expect(await cache.get("a", "1", () => entry("1", "rebuilt"))).toBe("aaaa");
    expect(await cache.get("b", "1", () => entry("1", "rebuilt"))).toBe("rebuilt");
    // larger than the whole budget: served, not kept
    expect(await cache.get("big", "1", () => entry("1", "x".repeat(11)))).toBe("x".repeat(11));
    expect(await cache.get("big", "1", () => entry("1", "again"))).toBe("again");
  });
});
