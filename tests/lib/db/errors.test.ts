import { describe, expect, test } from "vitest";
import { isDatabaseUnavailable } from "@/lib/db/errors";

// Error shapes as mysql2 and knex produce them (codes from mysql2's lib/constants/errors.js).
const driverError = (code: string, extra: Record<string, unknown> = {}) =>
  Object.assign(new Error(`${code} from the driver`), { code, ...extra });

describe("isDatabaseUnavailable", () => {
  test.each([
    ["refused connection (fatal)", driverError("ECONNREFUSED", { fatal: true, syscall: "connect" })],
    ["connection lost", driverError("PROTOCOL_CONNECTION_LOST", { fatal: true })],
    ["too many connections", driverError("ER_CON_COUNT_ERROR", { errno: 1040 })],
    ["server shutting down", driverError("ER_SERVER_SHUTDOWN", { errno: 1053 })],
    ["connection killed by the shutdown", driverError("ER_CONNECTION_KILLED", { errno: 1927 })],
    [
      "closed connection",
      Object.assign(new Error("Can't add new command when connection is in closed state"), { fatal: true }),
    ],
    [
      "knex pool timeout",
      Object.assign(new Error("Knex: Timeout acquiring a connection."), { name: "KnexTimeoutError" }),
    ],
    ["wrapped in cause", new Error("query failed", { cause: driverError("PROTOCOL_CONNECTION_LOST") })],
    ["inside an AggregateError", new AggregateError([driverError("ER_SERVER_SHUTDOWN")], "several")],
  ])("%s: unavailable", (_name, err) => {
    expect(isDatabaseUnavailable(err)).toBe(true);
  });

  test.each([
    [
      "a refused connection elsewhere (not from the driver)",
      driverError("ECONNREFUSED", { syscall: "connect" }),
    ],
    ["a duplicate key", driverError("ER_DUP_ENTRY", { errno: 1062 })],
    ["a syntax error", driverError("ER_PARSE_ERROR", { errno: 1064 })],
    ["a lock wait timeout", driverError("ER_LOCK_WAIT_TIMEOUT", { errno: 1205 })],
    ["a plain error", new Error("boom")],
    ["a fetch timeout", Object.assign(new Error("The operation timed out."), { name: "TimeoutError" })],
    ["not an error", "ECONNREFUSED"],
    ["null", null],
  ])("%s: not unavailable", (_name, err) => {
    expect(isDatabaseUnavailable(err)).toBe(false);
  });
});
