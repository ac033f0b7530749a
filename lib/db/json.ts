import "server-only";

/**
 * Value of a JSON column. MariaDB stores JSON as LONGTEXT with a validity check; depending on the
 * column metadata mysql2 hands it back parsed or as text. This accepts both. NULL stays null.
 */
export function jsonColumn<T>(value: unknown): T | null {
  if (value === null || value === undefined) return null;
  if (typeof value === "string") return JSON.parse(value) as T;
  if (Buffer.isBuffer(value)) return JSON.parse(value.toString("utf8")) as T;
  return value as T;
}
