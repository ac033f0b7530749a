import type { Metadata } from "next";
import Link from "next/link";
import { HydrationBoundary, QueryClient, dehydrate } from "@tanstack/react-query";
import { roleAtLeast } from "@/lib/auth/roles";
import { LabelCaution } from "@/lib/ui/caution";
import { SitePageHeader } from "@/features/sites/components/site-page-header";
import { loadSiteForPage } from "@/features/sites/server/page-data";
import { ReviewQueue } from "@/features/review/components/review-queue";
import { SiteTabs } from "@/features/review/components/site-tabs";
import { addMonths, monthRange, monthTitle } from "@/features/review/calendar-grid";
import { reviewKeys } from "@/features/review/queries";
import { eveningSpan, getQueue } from "@/features/review/server/queries";

type Props = {
  params: Promise<{ siteId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
};

export async function generateMetadata({ params }: Props): Promise<Metadata> {
  const { site } = await loadSiteForPage((await params).siteId);
  return { title: `Review queue · ${site.name}` };
}

export default async function ReviewPage({ params, searchParams }: Props) {
  const { site, role } = await loadSiteForPage((await params).siteId);
  const sp = await searchParams;
  const span = await eveningSpan(site.id);
  const asked = typeof sp.month === "string" && /^\d{4}-(0[1-9]|1[0-2])$/.test(sp.month) ? sp.month : null;
  const month = asked ?? span?.last.slice(0, 7) ?? new Date().toISOString().slice(0, 7);
  const range = monthRange(month);
  const queryClient = new QueryClient();
  await queryClient.prefetchQuery({ queryKey: reviewKeys.queue(site.id, range), queryFn: () => getQueue(site.id, range) });
  const link = (m: string) => `/sites/${site.id}/review?month=${m}`;

  return (
    <>
      <SitePageHeader
        site={site}
        title={`Review queue · ${monthTitle(month)}`}
        description="Evenings that most need a person come first: unclassified ones, then those closest to a threshold of the rule that decided. Reviewed and overridden evenings go last."
        actions={
          <>
            <Link href={link(addMonths(month, -1))} className="btn-quiet">
              <span aria-hidden="true">←</span> {monthTitle(addMonths(month, -1))}
            </Link>
            <Link href={link(addMonths(month, 1))} className="btn-quiet">
              {monthTitle(addMonths(month, 1))} <span aria-hidden="true">→</span>
            </Link>
          </>
        }
      />
      <SiteTabs siteId={site.id} />
      <LabelCaution className="mb-5" />
      <HydrationBoundary state={dehydrate(queryClient)}>
        <ReviewQueue key={month} siteId={site.id} range={range} canEdit={roleAtLeast(role, "analyst")} />
      </HydrationBoundary>
    </>
  );
}
