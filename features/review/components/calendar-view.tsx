"use client";

import Link from "next/link";
import { keepPreviousData, useQuery, useQueryClient } from "@tanstack/react-query";
import { useEffect, useMemo, useRef, useState, type KeyboardEvent } from "react";
import { LABEL_META, LABEL_ORDER } from "@/lib/ui/label-badge";
import type { EveningSummary, Label } from "@/features/review/schemas";
import { anomaliesOptions, eveningsOptions } from "@/features/review/queries";
import {
  ANOMALY_GLYPH,
  WEAK_GLYPH,
  describeAnomalies,
  describeFlags,
  describeWeak,
  flagsByDate,
  type EveningFlags,
} from "@/features/review/flags";
import {
  addMonths,
  dayTitle,
  keyTarget,
  monthOf,
  monthRange,
  monthShort,
  monthTitle,
  monthWeeks,
} from "@/features/review/calendar-grid";

type View = "month" | "year";
type Filters = { labels: Label[]; source: "all" | "override" | "auto"; reviewed: "all" | "yes" | "no" };

const WEEKDAYS = ["Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"];
const WEEKDAYS_LONG = ["Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"];

function rangeOf(view: View, month: string) {
  if (view === "month") return monthRange(month);
  const y = month.slice(0, 4);
  return { from: `${y}-01-01`, to: `${y}-12-31` };
}

function passes(e: EveningSummary, f: Filters): boolean {
  if (!f.labels.includes(e.label)) return false;
  if (f.source !== "all" && e.source !== f.source) return false;
  if (f.reviewed === "yes" && !e.reviewed) return false;
  if (f.reviewed === "no" && e.reviewed) return false;
  return true;
}

function describe(date: string, e: EveningSummary | undefined, shown: boolean, flags: EveningFlags | undefined): string {
  if (!e) return `${dayTitle(date)}: no evening`;
  const parts = [`${dayTitle(date)}: ${LABEL_META[e.label].name}`];
  if (e.source === "override") parts.push(`overridden, automatic label ${LABEL_META[e.autoLabel].name}`);
  if (e.reviewed) parts.push("reviewed");
  if (e.label === "unclassified" && e.reasons[0]) parts.push(e.reasons[0]);
  const flagged = describeFlags(flags);
  if (flagged) parts.push(flagged);
  if (!shown) parts.push("hidden by the filters");
  return parts.join("; ");
}

/**
 * The calendar of labelled evenings: a month grid or a twelve-month overview, paged without
 * reloading the page. One day is the tab stop (roving tabindex); arrows move by day and week,
 * Home/End to the week's ends, PageUp/PageDown by month, Enter opens the evening.
 */
export function CalendarView({
  siteId,
  initialMonth,
  initialView = "month",
}: {
  siteId: number;
  initialMonth: string;
  initialView?: View;
}) {
  const [view, setView] = useState<View>(initialView);
  const [month, setMonth] = useState(initialMonth);
  const [focusDate, setFocusDate] = useState(`${initialMonth}-01`);
  const [hoverDate, setHoverDate] = useState<string | null>(null);
  const [filters, setFilters] = useState<Filters>({ labels: [...LABEL_ORDER], source: "all", reviewed: "all" });
  const moved = useRef(false);
  const gridRef = useRef<HTMLDivElement>(null);
  const queryClient = useQueryClient();

  const range = rangeOf(view, month);
  const query = useQuery({ ...eveningsOptions(siteId, range), placeholderData: keepPreviousData });
  const evenings = query.data;
  const byDate = useMemo(() => new Map((evenings ?? []).map((e) => [e.date, e])), [evenings]);
  // Markers come from the anomalies endpoint, paged like the evenings; the calendar works without them.
  const flagQuery = useQuery({ ...anomaliesOptions(siteId, range), placeholderData: keepPreviousData });
  const flags = useMemo(
    () => flagsByDate(flagQuery.data?.anomalies ?? [], flagQuery.data?.weak ?? []),
    [flagQuery.data],
  );

  // Keep the address in step (shareable, survives reload) without a navigation.
  useEffect(() => {
    const url = new URL(window.location.href);
    url.searchParams.set("month", month);
    url.searchParams.set("view", view);
    window.history.replaceState(window.history.state, "", url);
  }, [month, view]);

  // Paging feels instant when the neighbours are already in the cache.
  useEffect(() => {
    const step = view === "month" ? 1 : 12;
    for (const d of [-step, step]) {
      const r = rangeOf(view, addMonths(month, d));
      void queryClient.prefetchQuery(eveningsOptions(siteId, r));
      void queryClient.prefetchQuery(anomaliesOptions(siteId, r));
    }
  }, [month, view, siteId, queryClient]);

  // The first day with an evening in the shown range is the tab stop while the chosen one is out of it.
  const inRange = (d: string) => d >= range.from && d <= range.to;
  const tabDate = inRange(focusDate) ? focusDate : (evenings?.find((e) => inRange(e.date))?.date ?? range.from);

  useEffect(() => {
    if (!moved.current) return;
    moved.current = false;
    gridRef.current?.querySelector<HTMLElement>(`[data-date="${focusDate}"]`)?.focus();
  }, [focusDate, view, evenings]);

  function onKeyDown(ev: KeyboardEvent<HTMLDivElement>) {
    const target = keyTarget(tabDate, ev.key);
    if (!target) return;
    ev.preventDefault();
    moved.current = true;
    setFocusDate(target);
    if (view === "month" && monthOf(target) !== month) setMonth(monthOf(target));
    if (view === "year" && target.slice(0, 4) !== month.slice(0, 4)) setMonth(monthOf(target));
  }

  function page(delta: number) {
    const next = addMonths(month, view === "month" ? delta : delta * 12);
    setMonth(next);
    setFocusDate(`${next}-01`);
  }

  const counts = useMemo(() => {
    const c: Record<Label, number> = { local: 0, stagnant: 0, advective: 0, unclassified: 0 };
    for (const e of evenings ?? []) c[e.label] += 1;
    return c;
  }, [evenings]);
  const overridden = (evenings ?? []).filter((e) => e.source === "override").length;
  const reviewed = (evenings ?? []).filter((e) => e.reviewed).length;
  const inShown = [...flags.keys()].filter((d) => d >= range.from && d <= range.to && byDate.has(d));
  const anomalyDays = inShown.filter((d) => flags.get(d)!.anomalies.length > 0).length;
  const weakDays = inShown.filter((d) => flags.get(d)!.weak !== null).length;

  const title = view === "month" ? monthTitle(month) : month.slice(0, 4);
  const detailDate = hoverDate ?? tabDate;
  const detail = byDate.get(detailDate);

  const cellProps = (date: string) => {
    const e = byDate.get(date);
    const shown = e ? passes(e, filters) : false;
    const f = e ? flags.get(date) : undefined;
    return {
      e,
      shown,
      flags: f,
      tabIndex: date === tabDate ? 0 : -1,
      "data-date": date,
      "aria-label": describe(date, e, shown, f),
      onFocus: () => setFocusDate(date),
      onMouseEnter: () => setHoverDate(date),
      onMouseLeave: () => setHoverDate(null),
    };
  };

  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div className="flex items-center gap-2">
          <button type="button" className="btn-quiet px-2.5" onClick={() => page(-1)} aria-label={view === "month" ? "Previous month" : "Previous year"}>
            <span aria-hidden="true">←</span>
          </button>
          <h2 id="calendar-title" className="min-w-40 text-center text-lg font-semibold tabular-nums" aria-live="polite">
            {title}
          </h2>
          <button type="button" className="btn-quiet px-2.5" onClick={() => page(1)} aria-label={view === "month" ? "Next month" : "Next year"}>
            <span aria-hidden="true">→</span>
          </button>
          {query.isFetching ? (
            <span role="status" className="text-xs text-ink-muted">
              Loading…
            </span>
          ) : null}
        </div>
        <div role="group" aria-label="View" className="inline-flex rounded-lg border border-line bg-surface-raised p-0.5">
          {(["month", "year"] as const).map((v) => (
            <button
              key={v}
              type="button"
              aria-pressed={view === v}
              onClick={() => setView(v)}
              className={`rounded-md px-3 py-1.5 text-sm font-medium ${view === v ? "bg-dusk-600 text-white dark:bg-dusk-300 dark:text-dusk-950" : "text-ink-muted hover:text-ink"}`}
            >
              {v === "month" ? "Month" : "Twelve months"}
            </button>
          ))}
        </div>
      </div>

      <FilterBar filters={filters} setFilters={setFilters} counts={counts} overridden={overridden} reviewed={reviewed} total={evenings?.length ?? 0} />

      {flagQuery.isError ? (
        <p role="status" className="text-sm text-ink-muted">
          The anomaly markers could not be loaded ({flagQuery.error.message}); the labels below are complete.
        </p>
      ) : null}
      {query.isError ? (
        <p role="alert" className="text-sm text-red-700 dark:text-red-300">
          The evenings could not be loaded: {query.error.message}
        </p>
      ) : null}

      <div className="grid gap-5 lg:grid-cols-[minmax(0,1fr)_17rem]">
        <div ref={gridRef} onKeyDown={onKeyDown}>
          {view === "month" ? (
            <MonthGrid siteId={siteId} month={month} cellProps={cellProps} />
          ) : (
            <YearGrid
              siteId={siteId}
              year={month.slice(0, 4)}
              cellProps={cellProps}
              openMonth={(m) => {
                setMonth(m);
                setView("month");
              }}
            />
          )}
          <p className="mt-3 flex flex-wrap gap-x-4 gap-y-1 text-xs text-ink-muted">
            <span>
              <span aria-hidden="true">✎</span> and a ring: overridden by a person
            </span>
            <span>
              <span aria-hidden="true">✓</span> reviewed
            </span>
            <span>
              <span aria-hidden="true">{ANOMALY_GLYPH}</span> anomalies: a trace-gas or flux excursion
              {flagQuery.data ? ` (${anomalyDays} evening${anomalyDays === 1 ? "" : "s"})` : ""}
            </span>
            <span>
              <span aria-hidden="true">{WEAK_GLYPH}</span> weak turbulence: night fluxes under the u* threshold
              {flagQuery.data ? ` (${weakDays})` : ""}
            </span>
            <span>dashed day: no evening stored</span>
            <span>U: unclassified (hover or focus for the reason)</span>
          </p>
          <p className="mt-1 text-xs text-ink-muted">
            Keys: arrows move by day and week, Home/End to the week&apos;s ends, Page Up/Down by month, Enter opens the evening.
          </p>
        </div>
        <DayDetail siteId={siteId} date={detailDate} evening={detail} flags={detail ? flags.get(detailDate) : undefined} />
      </div>
    </div>
  );
}

type CellProps = {
  e: EveningSummary | undefined;
  shown: boolean;
  flags: EveningFlags | undefined;
  tabIndex: number;
  "data-date": string;
  "aria-label": string;
  onFocus: () => void;
  onMouseEnter: () => void;
  onMouseLeave: () => void;
};

function FilterBar({
  filters,
  setFilters,
  counts,
  overridden,
  reviewed,
  total,
}: {
  filters: Filters;
  setFilters: (f: Filters) => void;
  counts: Record<Label, number>;
  overridden: number;
  reviewed: number;
  total: number;
}) {
  const toggle = (l: Label) =>
    setFilters({ ...filters, labels: filters.labels.includes(l) ? filters.labels.filter((x) => x !== l) : [...filters.labels, l] });
  return (
    <div className="card flex flex-wrap items-center gap-x-6 gap-y-3 px-4 py-3">
      <fieldset className="flex flex-wrap items-center gap-x-4 gap-y-2">
        <legend className="sr-only">Show labels</legend>
        {LABEL_ORDER.map((l) => (
          <label key={l} className="inline-flex cursor-pointer items-center gap-2 text-sm">
            <input type="checkbox" className="size-4 accent-dusk-600" checked={filters.labels.includes(l)} onChange={() => toggle(l)} />
            <span aria-hidden="true" className={`inline-grid size-5 place-items-center rounded font-mono text-[11px] font-bold ${LABEL_META[l].swatch}`}>
              {LABEL_META[l].glyph}
            </span>
            <span>{LABEL_META[l].name}</span>
            <span className="font-mono text-xs text-ink-muted tabular-nums">{counts[l]}</span>
          </label>
        ))}
      </fieldset>
      <div className="flex flex-wrap items-center gap-3 text-sm">
        <label className="inline-flex items-center gap-2">
          <span className="text-ink-muted">Labelled by</span>
          <select
            className="rounded-md border border-line bg-surface-raised px-2 py-1"
            value={filters.source}
            onChange={(e) => setFilters({ ...filters, source: e.target.value as Filters["source"] })}
          >
            <option value="all">rules or people</option>
            <option value="override">people (overridden, {overridden})</option>
            <option value="auto">rules only</option>
          </select>
        </label>
        <label className="inline-flex items-center gap-2">
          <span className="text-ink-muted">Review</span>
          <select
            className="rounded-md border border-line bg-surface-raised px-2 py-1"
            value={filters.reviewed}
            onChange={(e) => setFilters({ ...filters, reviewed: e.target.value as Filters["reviewed"] })}
          >
            <option value="all">all</option>
            <option value="no">not yet reviewed ({total - reviewed})</option>
            <option value="yes">reviewed ({reviewed})</option>
          </select>
        </label>
      </div>
    </div>
  );
}

function Chip({ label, overridden, size }: { label: Label; overridden: boolean; size: "lg" | "sm" }) {
  const m = LABEL_META[label];
  const box = size === "lg" ? "size-8 text-sm rounded-md" : "size-full text-[9px] rounded-[3px]";
  return (
    <span
      aria-hidden="true"
      className={`inline-grid place-items-center font-mono leading-none font-bold ${box} ${m.swatch} ${
        overridden ? "ring-2 ring-ink ring-offset-1 ring-offset-surface-raised" : ""
      }`}
    >
      {m.glyph}
    </span>
  );
}

function MonthGrid({ siteId, month, cellProps }: { siteId: number; month: string; cellProps: (d: string) => CellProps }) {
  const weeks = monthWeeks(month);
  return (
    <table role="grid" aria-labelledby="calendar-title" className="w-full table-fixed border-separate border-spacing-1.5">
      <thead>
        <tr>
          {WEEKDAYS.map((d, i) => (
            <th key={d} scope="col" abbr={WEEKDAYS_LONG[i]} className="pb-1 text-xs font-medium text-ink-muted">
              {d}
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {weeks.map((week, wi) => (
          <tr key={wi}>
            {week.map((date, di) =>
              date === null ? (
                <td key={di} role="gridcell" aria-hidden="true" />
              ) : (
                <td key={date} role="gridcell" className="align-top">
                  <DayCell siteId={siteId} date={date} {...cellProps(date)} />
                </td>
              ),
            )}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function FlagGlyphs({ flags }: { flags: EveningFlags | undefined }) {
  if (!flags) return null;
  const a = describeAnomalies(flags.anomalies);
  const w = describeWeak(flags.weak);
  return (
    <>
      {a ? <span title={a}>{ANOMALY_GLYPH}</span> : null}
      {w ? <span title={w}>{WEAK_GLYPH}</span> : null}
    </>
  );
}

function DayCell({ siteId, date, e, shown, flags, "aria-label": description, ...rest }: CellProps & { siteId: number; date: string }) {
  const day = Number(date.slice(8, 10));
  // The name comes from the content (visible day number hidden, full description for readers), so
  // what sighted and screen-reader users get agrees.
  const name = <span className="sr-only">{description}</span>;
  const base = "group relative flex h-20 flex-col rounded-lg border p-1.5 text-left transition-colors sm:h-24";
  if (!e) {
    return (
      <div {...rest} className={`${base} border-dashed border-line text-ink-muted`}>
        {name}
        <span aria-hidden="true" className="text-xs tabular-nums">
          {day}
        </span>
      </div>
    );
  }
  const tipId = `tip-${date}`;
  return (
    <Link
      href={`/sites/${siteId}/evenings/${e.id}`}
      {...rest}
      aria-describedby={e.label === "unclassified" ? tipId : undefined}
      className={`${base} border-line bg-surface-raised hover:border-dusk-400 hover:bg-surface-sunken ${shown ? "" : "opacity-30"}`}
    >
      {name}
      <span aria-hidden="true" className="flex items-center justify-between text-xs tabular-nums">
        <span className="font-medium text-ink">{day}</span>
        <span aria-hidden="true" className="flex gap-1 text-ink-muted">
          <FlagGlyphs flags={flags} />
          {e.source === "override" ? <span title="overridden by a person">✎</span> : null}
          {e.reviewed ? <span title="reviewed">✓</span> : null}
        </span>
      </span>
      <span className="grid flex-1 place-items-center">{shown ? <Chip label={e.label} overridden={e.source === "override"} size="lg" /> : null}</span>
      {e.label === "unclassified" ? (
        <span
          id={tipId}
          role="tooltip"
          className="pointer-events-none absolute top-full left-1/2 z-20 mt-1 hidden w-56 -translate-x-1/2 rounded-lg border border-line bg-surface-raised p-2 text-xs text-ink shadow-lg group-hover:block group-focus-visible:block"
        >
          <span className="font-semibold">Unclassified: </span>
          {e.reasons[0] ?? "no reason recorded"}
        </span>
      ) : null}
    </Link>
  );
}

function YearGrid({
  siteId,
  year,
  cellProps,
  openMonth,
}: {
  siteId: number;
  year: string;
  cellProps: (d: string) => CellProps;
  openMonth: (m: string) => void;
}) {
  const months = Array.from({ length: 12 }, (_, i) => `${year}-${String(i + 1).padStart(2, "0")}`);
  return (
    <div className="grid grid-cols-2 gap-4 sm:grid-cols-3 xl:grid-cols-4">
      {months.map((m) => (
        <div key={m} className="card p-2.5">
          <button type="button" onClick={() => openMonth(m)} className="mb-1 text-sm font-semibold hover:underline" id={`m-${m}`}>
            {monthShort(m)}
          </button>
          <table role="grid" aria-labelledby={`m-${m}`} className="w-full table-fixed border-separate border-spacing-0.5">
            <thead className="sr-only">
              <tr>
                {WEEKDAYS_LONG.map((d) => (
                  <th key={d} scope="col">
                    {d}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {monthWeeks(m).map((week, wi) => (
                <tr key={wi}>
                  {week.map((date, di) =>
                    date === null ? (
                      <td key={di} role="gridcell" aria-hidden="true" />
                    ) : (
                      <td key={date} role="gridcell">
                        <MiniCell siteId={siteId} date={date} {...cellProps(date)} />
                      </td>
                    ),
                  )}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ))}
    </div>
  );
}

function MiniCell({ siteId, e, shown, flags, ...rest }: CellProps & { siteId: number; date: string }) {
  const box = "block aspect-square w-full rounded-[3px]";
  if (!e) return <div {...rest} className={`${box} bg-surface-sunken`} />;
  // One notch inside the corner, anomalies before weak turbulence; the cell's name and the side panel say which.
  const mark = flags?.anomalies.length ? ANOMALY_GLYPH : flags?.weak ? WEAK_GLYPH : null;
  return (
    <Link href={`/sites/${siteId}/evenings/${e.id}`} {...rest} className={`relative ${box} ${shown ? "" : "opacity-25"}`}>
      <Chip label={e.label} overridden={e.source === "override"} size="sm" />
      {mark ? (
        <span
          aria-hidden="true"
          className="absolute top-0 right-0 grid size-2.5 place-items-center rounded-tr-[3px] rounded-bl-[3px] bg-surface-raised font-mono text-[7px] leading-none text-ink"
        >
          {mark}
        </span>
      ) : null}
    </Link>
  );
}

function DayDetail({
  siteId,
  date,
  evening,
  flags,
}: {
  siteId: number;
  date: string;
  evening: EveningSummary | undefined;
  flags: EveningFlags | undefined;
}) {
  const anomalies = flags ? describeAnomalies(flags.anomalies) : null;
  const weak = flags ? describeWeak(flags.weak) : null;
  return (
    <aside aria-label="Selected day" className="card h-fit space-y-3 p-4 text-sm lg:sticky lg:top-6">
      <h3 className="font-semibold">{dayTitle(date)}</h3>
      {!evening ? (
        <p className="text-ink-muted">No evening stored for this day.</p>
      ) : (
        <>
          <p className="flex items-center gap-2">
            <Chip label={evening.label} overridden={evening.source === "override"} size="lg" />
            <span>
              <span className="block font-medium">{LABEL_META[evening.label].name}</span>
              <span className="block text-xs text-ink-muted">
                {evening.source === "override"
                  ? `set by a person; the rules said ${LABEL_META[evening.autoLabel].name}`
                  : evening.rule
                    ? `rule ${evening.rule}`
                    : "no rule decided"}
              </span>
            </span>
          </p>
          {evening.reasons.length ? (
            <ul className="list-disc space-y-1 pl-4 text-xs text-ink-muted">
              {evening.reasons.slice(0, 3).map((r) => (
                <li key={r}>{r}</li>
              ))}
            </ul>
          ) : null}
          {anomalies || weak ? (
            <ul aria-label="Flags of this evening" className="space-y-1 text-xs">
              {anomalies ? (
                <li className="flex gap-1.5">
                  <span aria-hidden="true">{ANOMALY_GLYPH}</span>
                  <span>{anomalies}</span>
                </li>
              ) : null}
              {weak ? (
                <li className="flex gap-1.5">
                  <span aria-hidden="true">{WEAK_GLYPH}</span>
                  <span>{weak}</span>
                </li>
              ) : null}
            </ul>
          ) : null}
          <p className="text-xs text-ink-muted">
            {evening.sunsetUtc ? `Sunset ${evening.sunsetUtc.slice(11, 16)} UTC` : "No sunset (polar day or night)"} ·{" "}
            {evening.reviewed ? "reviewed" : "not yet reviewed"}
          </p>
          <Link href={`/sites/${siteId}/evenings/${evening.id}`} className="btn-quiet w-full">
            Open evening
          </Link>
        </>
      )}
    </aside>
  );
}
