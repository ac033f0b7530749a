import { queryOptions } from "@tanstack/react-query";
import type {
  ConflictBody,
  DateRange,
  EveningSummary,
  Label,
  QueueItem,
} from "@/features/review/schemas";
import type { AnomalyMark, WeakMark } from "@/features/review/flags";

/** Query keys of the review feature; invalidate `reviewKeys.site(siteId)` after a label change. */
export const reviewKeys = {
  site: (siteId: number) => ["review", siteId] as const,
  evenings: (siteId: number, range: DateRange) => ["review", siteId, "evenings", range.from, range.to] as const,
  queue: (siteId: number, range: DateRange) => ["review", siteId, "queue", range.from, range.to] as const,
  anomalies: (siteId: number, range: DateRange) => ["review", siteId, "anomalies", range.from, range.to] as const,
};

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
    throw new Error(body?.error?.message ?? `Request failed (${res.status})`);
  }
  return (await res.json()) as T;
}

/** Evenings of a site for a period, from GET /api/sites/:id/evenings. */
export function eveningsOptions(siteId: number, range: DateRange) {
  return queryOptions({
    queryKey: reviewKeys.evenings(siteId, range),
    queryFn: async () =>
      (await getJson<{ evenings: EveningSummary[] }>(`/api/sites/${siteId}/evenings?from=${range.from}&to=${range.to}`)).evenings,
    staleTime: 60_000,
  });
}

/** Anomalies and weak-turbulence nights of a period, from GET /api/sites/:id/anomalies (calendar markers). */
export function anomaliesOptions(siteId: number, range: DateRange) {
  return queryOptions({
    queryKey: reviewKeys.anomalies(siteId, range),
    queryFn: async () => {
      const body = await getJson<{ anomalies: AnomalyMark[]; weakTurbulence?: WeakMark[] }>(
        `/api/sites/${siteId}/anomalies?from=${range.from}&to=${range.to}&include=weak-turbulence`,
      );
      return { anomalies: body.anomalies, weak: body.weakTurbulence ?? [] };
    },
    staleTime: 60_000,
  });
}

/** The review queue of a period, from GET /api/sites/:id/evenings/queue. */
export function queueOptions(siteId: number, range: DateRange) {
  return queryOptions({
    queryKey: reviewKeys.queue(siteId, range),
    queryFn: async () =>
      (await getJson<{ queue: QueueItem[] }>(`/api/sites/${siteId}/evenings/queue?from=${range.from}&to=${range.to}`)).queue,
    staleTime: 30_000,
  });
}

/** What a label change came back with. */
export type ChangeOutcome =
  | { ok: true; evening: EveningSummary }
  | { ok: false; conflict: ConflictBody["error"]["current"] | null; message: string; fieldErrors?: Record<string, string[]> };

async function postChange(url: string, body: unknown): Promise<ChangeOutcome> {
  let res: Response;
  try {
    res = await fetch(url, {
      method: "POST",
      headers: { "content-type": "application/json", accept: "application/json" },
      body: JSON.stringify(body),
    });
  } catch {
    return { ok: false, conflict: null, message: "The server could not be reached. Nothing was saved; try again." };
  }
  const data = (await res.json().catch(() => null)) as
    | { evening: EveningSummary }
    | { error: { code: string; message: string; fieldErrors?: Record<string, string[]>; current?: ConflictBody["error"]["current"] } }
    | null;
  if (res.ok && data && "evening" in data) return { ok: true, evening: data.evening };
  const error = data && "error" in data ? data.error : null;
  return {
    ok: false,
    conflict: error?.code === "conflict" && error.current ? error.current : null,
    message: error?.message ?? `Request failed (${res.status}). Nothing was saved.`,
    fieldErrors: error?.fieldErrors,
  };
}

/** POST /api/evenings/:id/overrides */
export function postOverride(eveningId: number, input: { label: Label; note: string; version: number }) {
  return postChange(`/api/evenings/${eveningId}/overrides`, input);
}

/** POST /api/evenings/:id/revert (lead) */
export function postRevert(eveningId: number, input: { version: number; note?: string }) {
  return postChange(`/api/evenings/${eveningId}/revert`, input);
}

/** POST /api/evenings/:id/reviewed */
export function postReviewed(eveningId: number, input: { version: number }) {
  return postChange(`/api/evenings/${eveningId}/reviewed`, input);
}
