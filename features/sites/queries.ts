import { queryOptions } from "@tanstack/react-query";
import type { Site, SiteSummary } from "@/features/sites/schemas";

/** Query keys of the sites feature; invalidate `sitesKeys.all` after any site change. */
export const sitesKeys = {
  all: ["sites"] as const,
  list: (groupId: number) => ["sites", "list", groupId] as const,
  detail: (siteId: number) => ["sites", "detail", siteId] as const,
};

async function getJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  if (!res.ok) {
    const body = (await res.json().catch(() => null)) as { error?: { message?: string } } | null;
    throw new Error(body?.error?.message ?? `Request failed (${res.status})`);
  }
  return (await res.json()) as T;
}

/** Sites of a group with their summaries, from GET /api/sites?groupId=. */
export function sitesListOptions(groupId: number) {
  return queryOptions({
    queryKey: sitesKeys.list(groupId),
    queryFn: async () => (await getJson<{ sites: SiteSummary[] }>(`/api/sites?groupId=${groupId}`)).sites,
  });
}

/** One site, from GET /api/sites/:siteId. */
export function siteOptions(siteId: number) {
  return queryOptions({
    queryKey: sitesKeys.detail(siteId),
    queryFn: async () => (await getJson<{ site: Site }>(`/api/sites/${siteId}`)).site,
  });
}
