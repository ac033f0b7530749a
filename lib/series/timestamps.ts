/**
 * Timestamp text to UTC epoch milliseconds. Pure and client-safe.
 *
 * Accepted (common practice in tower files):
 *  - `YYYYMMDDHHMM` and `YYYYMMDDHHMMSS` (the trade's TIMESTAMP_START / TIMESTAMP_END);
 *  - ISO 8601 `YYYY-MM-DDTHH:MM[:SS[.fff]]` with `Z`, `+HH:MM`, `+HHMM` or `+HH`, or without offset;
 *  - `YYYY-MM-DD HH:MM[:SS]` and `YYYY/MM/DD HH:MM[:SS]`, also `HHMM` after the date;
 *  - a bare date `YYYY-MM-DD` (midnight).
 * Years before 1900 are not read (a zero-padded or shortened year is a typo).
 * Hour 24 is accepted with minute 0 (loggers write `24:00` for the end of a day).
 * Without an explicit offset the text is a reading of the data clock, whose offset is given.
 */

const ISO = /^(\d{4})[-/](\d{1,2})[-/](\d{1,2})(?:[T ](\d{1,2}):?(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?)?\s*(Z|[+-]\d{2}(?::?\d{2})?)?$/i;

/** Earliest year read; earlier years are typos (and Date.UTC would shift 0..99 by 1900). */
const MIN_YEAR = 1900;

function daysInMonth(y: number, m: number): number {
  if (m === 2) return (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0 ? 29 : 28;
  return m === 4 || m === 6 || m === 9 || m === 11 ? 30 : 31;
}

function compose(y: number, mo: number, d: number, h: number, mi: number, s: number, ms: number, offsetMinutes: number): number {
  // Date.UTC moves years 0..99 to 1900..1999, and no tower measured before 1900: "0022" is a typo.
  if (y < MIN_YEAR) return NaN;
  if (mo < 1 || mo > 12 || d < 1 || d > daysInMonth(y, mo)) return NaN;
  if (h > 24 || mi > 59 || s > 59 || (h === 24 && (mi !== 0 || s !== 0))) return NaN;
  return Date.UTC(y, mo - 1, d, h, mi, s, ms) - offsetMinutes * 60_000;
}

function digitsAt(s: string, from: number, count: number): number {
  let v = 0;
  for (let i = from; i < from + count; i++) {
    const c = s.charCodeAt(i) - 48;
    if (c < 0 || c > 9) return -1;
    v = v * 10 + c;
  }
  return v;
}

/**
 * Parse a timestamp; returns UTC epoch ms, or NaN when the text is not a timestamp we read.
 * @param text the cell text
 * @param clockOffsetMinutes UTC offset of the data clock in minutes (e.g. -300 for UTC-5),
 *   used when the text carries no offset of its own
 */
export function parseTimestamp(text: string, clockOffsetMinutes: number): number {
  let s = text;
  const n0 = s.length;
  if (n0 === 0) return NaN;
  if (s.charCodeAt(0) <= 32 || s.charCodeAt(n0 - 1) <= 32) s = s.trim();
  const n = s.length;
  if (n === 12 || n === 14) {
    const y = digitsAt(s, 0, 4);
    const mo = digitsAt(s, 4, 2);
    const d = digitsAt(s, 6, 2);
    const h = digitsAt(s, 8, 2);
    const mi = digitsAt(s, 10, 2);
    const sec = n === 14 ? digitsAt(s, 12, 2) : 0;
    if (y >= 0 && mo >= 0 && d >= 0 && h >= 0 && mi >= 0 && sec >= 0) {
      return compose(y, mo, d, h, mi, sec, 0, clockOffsetMinutes);
    }
  }
  const m = ISO.exec(s);
  if (!m) return NaN;
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const h = m[4] === undefined ? 0 : Number(m[4]);
  const mi = m[5] === undefined ? 0 : Number(m[5]);
  const sec = m[6] === undefined ? 0 : Number(m[6]);
  const ms = m[7] === undefined ? 0 : Math.floor(Number(`0.${m[7]}`) * 1000);
  let offset = clockOffsetMinutes;
  const z = m[8];
  if (z !== undefined) {
    if (z === "Z" || z === "z") offset = 0;
    else {
      const sign = z[0] === "-" ? -1 : 1;
      const digits = z.slice(1).replace(":", "");
      const oh = Number(digits.slice(0, 2));
      const om = digits.length > 2 ? Number(digits.slice(2, 4)) : 0;
      if (oh > 14 || om > 59) return NaN;
      offset = sign * (oh * 60 + om);
    }
  }
  return compose(y, mo, d, h, mi, sec, ms, offset);
}

/** Whether the text carries its own UTC offset (ISO 8601 `Z` or `+HH:MM`). */
export function hasExplicitOffset(text: string): boolean {
  const m = ISO.exec(text.trim());
  return m !== null && m[8] !== undefined;
}
