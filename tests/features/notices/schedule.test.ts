import { describe, expect, test } from "vitest";
import { runNoticeSchedule } from "@/features/notices/server/schedule";

// What a refused connection looks like by the time it reaches the loop (code, empty message).
function refused(): Error {
  return Object.assign(new AggregateError([], ""), { code: "ECONNREFUSED" });
}

describe("notice schedule", () => {
  test("logs the full error once per run of failures, one line for each further one, and one when it recovers", async () => {
    const outcomes: Array<"ok" | Error> = [
      refused(),
      refused(),
      refused(),
      "ok",
      "ok",
      new Error("digest query broke"),
      "ok",
    ];
    const logged: unknown[][] = [];
    const stop = new AbortController();
    let rounds = 0;
    await runNoticeSchedule({
      signal: stop.signal,
      pollMs: 0,
      log: (...args) => logged.push(args),
      round: async () => {
        const outcome = outcomes[rounds++];
        if (rounds === outcomes.length) stop.abort();
        if (outcome instanceof Error) throw outcome;
      },
    });

    expect(rounds).toBe(outcomes.length);
    expect(logged.map((args) => args[0])).toEqual([
      "[notices] round failed: ECONNREFUSED",
      "[notices] round failed: ECONNREFUSED (2 in a row)",
      "[notices] round failed: ECONNREFUSED (3 in a row)",
      "[notices] recovered after 3 failed round(s)",
      "[notices] round failed: Error: digest query broke",
      "[notices] recovered after 1 failed round(s)",
    ]);
    // The error itself (with its stack) only beside the first failure of each run.
    expect(logged.map((args) => args.length)).toEqual([2, 1, 1, 1, 2, 1]);
    expect(logged[0]?.[1]).toMatchObject({ code: "ECONNREFUSED" });
    expect(logged[4]?.[1]).toMatchObject({ message: "digest query broke" });
  });
});
