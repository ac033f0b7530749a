import "server-only";

/*
 * Telling "the database is not reachable right now" apart from every other failure, so that
 * callers can answer 503 (try again) instead of 500 (a bug), and loops can back off and retry.
 */

/**
 * Error codes of mysql2, MariaDB and Node's sockets that mean the server is away, restarting
 * or full, not that the query was wrong.
 */
const UNAVAILABLE_CODES: ReadonlySet<string> = new Set([
  // mysql2: the connection broke or was closed under a command
  "PROTOCOL_CONNECTION_LOST",
  "PROTOCOL_SEQUENCE_TIMEOUT",
  "PROTOCOL_ENQUEUE_AFTER_FATAL_ERROR",
  "PROTOCOL_ENQUEUE_AFTER_QUIT",
  "PROTOCOL_ENQUEUE_HANDSHAKE_TWICE",
  // server answers: too many connections, shutting down, connection killed by the shutdown
  "ER_CON_COUNT_ERROR",
  "ER_TOO_MANY_USER_CONNECTIONS",
  "ER_SERVER_SHUTDOWN",
  "ER_CONNECTION_KILLED",
  "ER_NORMAL_SHUTDOWN",
  "ER_QUERY_INTERRUPTED",
]);

/**
 * Socket codes; they count only on an error the driver marked fatal, so that a refused
 * connection to object storage or SMTP is not reported as the database being away.
 */
const SOCKET_CODES: ReadonlySet<string> = new Set([
  "ECONNREFUSED",
  "ECONNRESET",
  "ETIMEDOUT",
  "EPIPE",
  "EHOSTUNREACH",
  "ENETUNREACH",
  "ENOTFOUND",
  "EAI_AGAIN",
]);

/** Messages of errors that carry no code (the driver refusing a command on a closed connection, knex's pool). */
const UNAVAILABLE_MESSAGES = [
  /Can't add new command when connection is in closed state/i,
  /Connection lost: The server closed the connection/i,
  /Can't write in closed state/i,
  /Timeout acquiring a connection/i,
];

function oneIsUnavailable(err: unknown): boolean {
  if (typeof err !== "object" || err === null) return false;
  const e = err as { code?: unknown; name?: unknown; message?: unknown; fatal?: unknown };
  if (typeof e.code === "string" && UNAVAILABLE_CODES.has(e.code)) return true;
  if (typeof e.code === "string" && SOCKET_CODES.has(e.code) && e.fatal === true) return true;
  if (e.name === "KnexTimeoutError") return true;
  return typeof e.message === "string" && UNAVAILABLE_MESSAGES.some((re) => re.test(e.message as string));
}

/**
 * Whether `err` (or an error it wraps through `cause` or AggregateError's `errors`) says the
 * database cannot be reached right now: refused or lost connections, a server shutting down,
 * too many connections, or knex's pool timing out while acquiring one.
 */
export function isDatabaseUnavailable(err: unknown, depth = 0): boolean {
  if (depth > 5 || typeof err !== "object" || err === null) return false;
  if (oneIsUnavailable(err)) return true;
  const e = err as { cause?: unknown; errors?: unknown };
  if (isDatabaseUnavailable(e.cause, depth + 1)) return true;
  return Array.isArray(e.errors) && e.errors.some((inner) => isDatabaseUnavailable(inner, depth + 1));
}

/** Seconds a client should wait before retrying while the database is away (Retry-After). */
export const DATABASE_RETRY_AFTER_S = 5;

/** What people and clients are told while the database is away. */
export const DATABASE_UNAVAILABLE_MESSAGE = "The database is not reachable; try again in a moment.";

/** A one-line description for logs (code and message, no stack, no SQL). */
export function describeDatabaseError(err: unknown): string {
  if (typeof err !== "object" || err === null) return String(err);
  const e = err as { code?: unknown; message?: unknown; name?: unknown };
  const code = typeof e.code === "string" ? e.code : typeof e.name === "string" ? e.name : "error";
  const message = typeof e.message === "string" ? e.message.split("\n")[0]!.slice(0, 200) : "";
  return `${code}${message ? `: ${message}` : ""}`;
}
