/*
 * Calendar arithmetic on local dates (YYYY-MM-DD strings, no time zone involved): month grids
 * with weeks starting on Monday (ISO 8601) and the day a navigation key moves to.
 */

const DAY_MS = 86_400_000;

/** "2025-06" of a date. */
export function monthOf(date: string): string {
  return date.slice(0, 7);
}

export function addDays(date: string, days: number): string {
  return new Date(Date.parse(`${date}T00:00:00Z`) + days * DAY_MS).toISOString().slice(0, 10);
}

/** First day of the month `month` ("YYYY-MM") shifted by `delta` months. */
export function addMonths(month: string, delta: number): string {
  const [y, m] = month.split("-").map(Number) as [number, number];
  const d = new Date(Date.UTC(y, m - 1 + delta, 1));
  return d.toISOString().slice(0, 7);
}

export function daysInMonth(month: string): number {
  const [y, m] = month.split("-").map(Number) as [number, number];
  return new Date(Date.UTC(y, m, 0)).getUTCDate();
}

export function monthRange(month: string): { from: string; to: string } {
  return { from: `${month}-01`, to: `${month}-${String(daysInMonth(month)).padStart(2, "0")}` };
}

/** 0 = Monday ... 6 = Sunday. */
export function weekdayIndex(date: string): number {
  return (new Date(`${date}T00:00:00Z`).getUTCDay() + 6) % 7;
}

/** The month as weeks of seven cells, Monday first; cells outside the month are null. */
export function monthWeeks(month: string): Array<Array<string | null>> {
  const first = `${month}-01`;
  const lead = weekdayIndex(first);
  const n = daysInMonth(month);
  const cells: Array<string | null> = [...Array<null>(lead).fill(null)];
  for (let d = 1; d <= n; d++) cells.push(`${month}-${String(d).padStart(2, "0")}`);
  while (cells.length % 7) cells.push(null);
  const weeks: Array<Array<string | null>> = [];
  for (let i = 0; i < cells.length; i += 7) weeks.push(cells.slice(i, i + 7));
  return weeks;
}

/**
 * The date a key moves to from `date`: arrows by a day or a week, Home/End to the start or end
 * of the week, PageUp/PageDown by a month (the same day, clamped to the month's length).
 * Null for keys that do not move.
 */
export function keyTarget(date: string, key: string): string | null {
  switch (key) {
    case "ArrowLeft":
      return addDays(date, -1);
    case "ArrowRight":
      return addDays(date, 1);
    case "ArrowUp":
      return addDays(date, -7);
    case "ArrowDown":
      return addDays(date, 7);
    case "Home":
      return addDays(date, -weekdayIndex(date));
    case "End":
      return addDays(date, 6 - weekdayIndex(date));
    case "PageUp":
    case "PageDown": {
      const month = addMonths(monthOf(date), key === "PageUp" ? -1 : 1);
      const day = Math.min(Number(date.slice(8, 10)), daysInMonth(month));
      return `${month}-${String(day).padStart(2, "0")}`;
    }
    default:
      return null;
  }
}

const MONTH_NAMES = [
  "January",
  "February",
  "March",
  "April",
  "May",
  "June",
  "July",
  "August",
  "September",
  "October",
  "November",
  "December",
];

/** "June 2025". */
export function monthTitle(month: string): string {
  const [y, m] = month.split("-").map(Number) as [number, number];
  return `${MONTH_NAMES[m - 1]} ${y}`;
}

export function monthShort(month: string): string {
  const m = Number(month.slice(5, 7));
  return (MONTH_NAMES[m - 1] ?? "").slice(0, 3);
}

/** "Tue 3 June 2025". */
export function dayTitle(date: string): string {
  const d = new Date(`${date}T00:00:00Z`);
  const wd = ["Sun", "Mon", "Tue", "Wed", "Thu", "Fri", "Sat"][d.getUTCDay()];
  return `${wd} ${d.getUTCDate()} ${MONTH_NAMES[d.getUTCMonth()]} ${d.getUTCFullYear()}`;
}
