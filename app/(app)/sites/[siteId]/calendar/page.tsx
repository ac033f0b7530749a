import type { Metadata } from "next";
import { HydrationBoundary, QueryClient, dehydrate } from "@tanstack/react-query";
import { LabelCaution } from "@/lib/ui/caution";
import { SitePageHeader } from "@/features/sites/components/site-page-header";
import { loadSiteForPage } from "@/features/sites/server/page-data";
import { CalendarView } from "@/features/review/components/calendar-view";
import { SiteTabs } from "@/features/review/components/site-tabs";
import { monthRange } from "@/features/review/calendar-grid";
import { reviewKeys } from "@/features/review/queries";
import { eveningSpan, listEvenings } from "@/features/review/server/queries";

type Props = {
  params: Promise<{ siteId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
};

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { site } = await loadSiteForPage((await params).siteId);
  return { title: `Calendar · ${site.name}` };
}

export default async function CalendarPage({ params, searchParams }: Props) {
  const { site } = await loadSiteForPage((await params).siteId);
  const sp = await searchParams;
  const span = await eveningSpan(site.id);
  const asked = typeof sp.month === "string" && /^\d{4}-(0[1-9]|1[0-2])$/.test(sp.month) ? sp.month : null;
  const month = asked ?? span?.last.slice(0, 7) ?? new Date().toISOString().slice(0, 7);
  const view = sp.view === "year" ? "year" : "month";
  const range = view === "month" ? monthRange(month) : { from: `${month.slice(0, 4)}-01-01`, to: `${month.slice(0, 4)}-12-31` };

  // The first month arrives with the page; later months come through the route handler.
  const queryClient = new QueryClient();
  await queryClient.prefetchQuery({ queryKey: reviewKeys.evenings(site.id, range), queryFn: () => listEvenings(site.id, range) });

  return (
    <>
      <SitePageHeader
        site={site}
        title="Calendar of evenings"
        description={
          span
            ? `Evenings from ${span.first} to ${span.last}, each labelled relative to that day's sunset.`
            : "No evenings yet: import data for this site and they appear here."
        }
      />
      <SiteTabs siteId={site.id} />
      <LabelCaution className="mb-5" />
      <HydrationBoundary state={dehydrate(queryClient)}>
        <CalendarView siteId={site.id} initialMonth={month} initialView={view} />
      </HydrationBoundary>
    </>
  );
}
