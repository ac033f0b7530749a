import { describe, expect, test } from "vitest";
import { db } from "@/lib/db/knex";
import { compiledRead } from "@/lib/db/compiled";
import { createUser } from "@/tests/support/db";

describe("compiledRead", () => {
  test("runs a knex-built read with each call's values in place of the sentinels", async () => {
    const a = await createUser({ displayName: "First Example" });
    const b = await createUser({ displayName: "Second Example" });
    const byIdAndName = compiledRead<{ id: string; name: string }, { id: string; display_name: string }>(
      { id: "\u0000id", name: "\u0000name" },
      (p) => db("users").where({ id: p.id }).orWhere({ display_name: p.name }).orderBy("id").select("id", "display_name").limit(5),
    );
    expect(await byIdAndName({ id: a.id, name: "nobody" })).toEqual([{ id: a.id, display_name: "First Example" }]);
    const both = await byIdAndName({ id: a.id, name: "Second Example" });
    expect(both.map((r) => r.id).sort()).toEqual([a.id, b.id].sort());
    // a value with quotes and a placeholder sign is bound, not spliced into the SQL
    expect(await byIdAndName({ id: "x' OR '1'='1", name: "?" })).toEqual([]);
  });

  test("refuses a build that does not bind every parameter", async () => {
    const broken = compiledRead<{ id: number; unused: number }, unknown>({ id: -1, unused: -2 }, (p) =>
      db("users").where("id", p.id).select("id"),
    );
    await expect(broken({ id: 1, unused: 2 })).rejects.toThrow(/unused/);
  });
});
