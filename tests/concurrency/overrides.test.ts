/*
 * Many people changing the same evening at once, through the real route handlers against the
 * real database: optimistic concurrency must let exactly one change through per version, answer
 * the rest with 409 and the newer label, and keep evening_events an append-only chain in which
 * each entry starts from the label the previous one ended on.
 */
import { describe, expect, test } from "vitest";
import { POST as overridePOST } from "@/app/api/evenings/[eveningId]/overrides/route";
import { POST as revertPOST } from "@/app/api/evenings/[eveningId]/revert/route";
import { POST as reviewedPOST } from "@/app/api/evenings/[eveningId]/reviewed/route";
import type { Role } from "@/lib/auth/roles";
import { db } from "@/lib/db/knex";
import { addMember, clientFor, createSiteFor, createUser, createUserWithGroup } from "@/tests/support/db";
import type { FakeClient } from "@/tests/support/next";
import type { ConflictBody, EveningSummary, Label } from "@/features/review/schemas";
import { insertEvenings } from "@/tests/features/review/fixtures";

const BASE = "http://localhost:3000";
const post = (path: string, body: unknown) =>
  new Request(`${BASE}${path}`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(body),
  });
const eve = (id: number) => ({ params: Promise.resolve({ eveningId: String(id) }) });

type Kind = "override" | "revert" | "reviewed";
type Answer = { kind: Kind; status: number; body: unknown; label?: Label };

async function send(c: FakeClient, id: number, kind: Kind, body: Record<string, unknown>): Promise<Answer> {
  const route = kind === "override" ? overridePOST : kind === "revert" ? revertPOST : reviewedPOST;
  const path = kind === "override" ? "overrides" : kind;
  const res = await c.call(() => route(post(`/api/evenings/${id}/${path}`, body), eve(id)));
  return { kind, status: res.status, body: await res.json(), label: body.label as Label | undefined };
}

type EventRow = { id: number; kind: string; from_label: Label | null; to_label: Label };
type EveningState = { version: number; final_label: Label; label_source: string; reviewed: number };

const state = (id: number): Promise<EveningState> =>
  db("evenings").where({ id }).first("version", "final_label", "label_source", "reviewed");
const history = (id: number): Promise<EventRow[]> =>
  db("evening_events").where({ evening_id: id }).orderBy("id").select("id", "kind", "from_label", "to_label");

/**
 * The history replays to the stored label: ids strictly increase, the first entry is the
 * automatic one, every later entry starts where the previous one ended, and each change
 * after the first classification bumped the version once.
 */
async function expectConsistent(id: number, initialVersion: number): Promise<EventRow[]> {
  const events = await history(id);
  const s = await state(id);
  expect(events[0]?.kind).toBe("auto");
  for (let i = 1; i < events.length; i++) {
    expect(events[i]!.id).toBeGreaterThan(events[i - 1]!.id);
    expect(events[i]!.from_label, `event ${i} (${events[i]!.kind})`).toBe(events[i - 1]!.to_label);
  }
  expect(events.at(-1)!.to_label).toBe(s.final_label);
  expect(s.version).toBe(initialVersion + events.length - 1);
  return events;
}

async function people(groupId: number, roles: Role[]): Promise<FakeClient[]> {
  return Promise.all(
    roles.map(async (role, i) => {
      const u = await createUser({ displayName: `Concurrent ${role} ${i}` });
      await addMember(u.id, groupId, role);
      return clientFor(u, { groupId });
    }),
  );
}

async function scene(autoLabel: Label = "local") {
  const { user: lead, group } = await createUserWithGroup({ role: "lead" });
  const site = await createSiteFor(group.id);
  const [id] = await insertEvenings(site.id, [{ date: "2025-07-14", autoLabel }]);
  return { id: id!, group, lead: await clientFor(lead, { groupId: group.id }) };
}

describe("concurrent changes to one evening", () => {
  test("20 simultaneous overrides with the same version: one wins, 19 get 409 with the winner's label", async () => {
    const { id, group } = await scene("local");
    const clients = await people(
      group.id,
      Array.from({ length: 20 }, (_, i) => (i % 4 === 0 ? "lead" : "analyst")),
    );
    const before = await state(id);
    const labels: Label[] = ["stagnant", "advective", "unclassified"];

    const answers = await Promise.all(
      clients.map((c, i) =>
        send(c, id, "override", {
          label: labels[i % labels.length],
          note: `simultaneous note ${i}`,
          version: before.version,
        }),
      ),
    );

    const won = answers.filter((a) => a.status === 200);
    const lost = answers.filter((a) => a.status === 409);
    expect(won).toHaveLength(1);
    expect(lost).toHaveLength(19);
    const winner = won[0]!;
    expect((winner.body as { evening: EveningSummary }).evening.label).toBe(winner.label);

    const after = await state(id);
    expect(after.version).toBe(before.version + 1);
    expect(after.final_label).toBe(winner.label);
    expect(after.label_source).toBe("override");
    for (const a of lost) {
      const body = a.body as ConflictBody;
      expect(body.error.code).toBe("conflict");
      expect(body.error.current).toMatchObject({
        label: winner.label,
        source: "override",
        version: before.version + 1,
      });
    }

    const events = await expectConsistent(id, before.version);
    expect(events.map((e) => e.kind)).toEqual(["auto", "override"]);
    const audits = await db("audit_log")
      .where({ entity_type: "evening", entity_id: String(id) })
      .count({ n: "*" });
    expect(Number(audits[0]?.n)).toBe(1);
  });

  test("five evenings raced at once, 20 overrides each: one winner per evening, histories independent", async () => {
    const { group } = await scene("local");
    const site = await createSiteFor(group.id);
    const ids = await insertEvenings(
      site.id,
      ["2025-08-01", "2025-08-02", "2025-08-03", "2025-08-04", "2025-08-05"].map((date) => ({
        date,
        autoLabel: "local" as const,
      })),
    );
    const clients = await people(
      group.id,
      Array.from({ length: 20 }, () => "analyst"),
    );
    const answers = await Promise.all(
      ids.flatMap((id) =>
        clients.map((c, i) =>
          send(c, id, "override", {
            label: i % 2 ? "stagnant" : "advective",
            note: `race ${i}`,
            version: 1,
          }).then((a) => ({ id, ...a })),
        ),
      ),
    );
    for (const id of ids) {
      const mine = answers.filter((a) => a.id === id);
      expect(mine.filter((a) => a.status === 200)).toHaveLength(1);
      expect(mine.filter((a) => a.status === 409)).toHaveLength(19);
      const events = await expectConsistent(id, 1);
      expect(events.map((e) => e.kind)).toEqual(["auto", "override"]);
    }
  });

  test("a chain of sequential overrides and reverts keeps a gap-free, append-only history", async () => {
    const { id, group, lead } = await scene("stagnant");
    const [analyst] = await people(group.id, ["analyst"]);
    const start = await state(id);
    const seen: EventRow[][] = [await history(id)];
    const steps: Array<{ c: FakeClient; kind: Kind; label?: Label }> = [
      { c: analyst!, kind: "override", label: "local" },
      { c: lead, kind: "override", label: "advective" },
      { c: analyst!, kind: "override", label: "unclassified" },
      { c: lead, kind: "revert" },
      { c: analyst!, kind: "override", label: "local" },
      { c: lead, kind: "override", label: "stagnant" },
      { c: lead, kind: "revert" },
      { c: analyst!, kind: "override", label: "advective" },
    ];
    for (const [i, step] of steps.entries()) {
      const { version } = await state(id);
      const body =
        step.kind === "override"
          ? { label: step.label, note: `step ${i}`, version }
          : { version, note: `step ${i}` };
      const a = await send(step.c, id, step.kind, body);
      expect(a.status, JSON.stringify(a.body)).toBe(200);
      const now = await history(id);
      // Append-only: everything seen before is still there, unchanged, and one entry was added.
      expect(now.slice(0, -1)).toEqual(seen.at(-1));
      expect(now).toHaveLength(seen.at(-1)!.length + 1);
      seen.push(now);
    }
    const events = await expectConsistent(id, start.version);
    expect(events.map((e) => e.kind)).toEqual(["auto", ...steps.map((s) => s.kind)]);
    expect((await state(id)).version).toBe(start.version + steps.length);
  });

  test("rounds of mixed overrides, reverts and reviews at once: at most one change per version, never a torn history", async () => {
    const { id, group, lead } = await scene("local");
    const analysts = await people(group.id, ["analyst", "analyst", "analyst", "lead"]);
    const start = await state(id);
    const labels: Label[] = ["stagnant", "advective", "unclassified", "local"];

    for (let round = 0; round < 6; round++) {
      const before = await state(id);
      const eventsBefore = (await history(id)).length;
      const requests: Array<Promise<Answer>> = [];
      for (let i = 0; i < 12; i++) {
        const c = i % 5 === 0 ? lead : analysts[i % analysts.length]!;
        const kind: Kind = i % 3 === 0 ? "override" : i % 3 === 1 ? "revert" : "reviewed";
        const label = labels[(round + i) % labels.length]!;
        const body: Record<string, unknown> =
          kind === "override"
            ? { label, note: `round ${round} request ${i}`, version: before.version }
            : { version: before.version };
        // Reverts need a lead; an analyst's revert must be refused without disturbing the race.
        requests.push(send(kind === "revert" ? lead : c, id, kind, body));
      }
      const answers = await Promise.all(requests);
      for (const a of answers) expect([200, 409, 422]).toContain(a.status);

      const after = await state(id);
      const events = await expectConsistent(id, start.version);
      const added = events.length - eventsBefore;
      // Overrides with a label other than the current one are in every round, so one change always lands.
      expect(added).toBe(1);
      expect(after.version).toBe(before.version + 1);
      const change = events.at(-1)!;
      const changers = answers.filter((a) => a.status === 200 && a.kind === change.kind);
      expect(changers.length).toBeGreaterThanOrEqual(1);
      if (change.kind !== "reviewed") expect(changers).toHaveLength(1);
      for (const a of answers.filter((x) => x.status === 409)) {
        expect((a.body as ConflictBody).error.current).toMatchObject({
          label: after.final_label,
          version: after.version,
        });
      }
    }
    const kinds = (await history(id)).map((e) => e.kind);
    expect(kinds).toHaveLength(7);
  });
});
