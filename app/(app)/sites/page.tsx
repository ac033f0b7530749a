import { HydrationBoundary, QueryClient, dehydrate } from "@tanstack/react-query";
import type { Metadata } from "next";
import Link from "next/link";
import { getActiveGroup } from "@/lib/auth/session";
import { roleAtLeast } from "@/lib/auth/roles";
import { PageHeader } from "@/lib/ui/page-header";
import { SiteList } from "@/features/sites/components/site-list";
import { sitesKeys } from "@/features/sites/queries";
import { listSites } from "@/features/sites/server/queries";

export const metadata: Metadata = { title: "Sites" };

export default async function SitesPage() {
  const active = await getActiveGroup();
  if (!active) {
    return <PageHeader title="Sites" description="You are not a member of any research group yet." />;
  }
  const canManage = roleAtLeast(active.role, "lead");
  // Same query key as the client's useQuery: the list arrives rendered and refetches from the API later.
  const queryClient = new QueryClient();
  await queryClient.prefetchQuery({
    queryKey: sitesKeys.list(active.groupId),
    queryFn: () => listSites(active.groupId),
  });

  return (
    <>
      <PageHeader
        title="Sites"
        eyebrow={active.groupName}
        description="Towers of this group with their set-up and the data labelled so far."
        actions={
          canManage ? (
            <Link href="/sites/new" className="btn-primary">
              <span aria-hidden="true">+</span> New site
            </Link>
          ) : null
        }
      />
      <HydrationBoundary state={dehydrate(queryClient)}>
        <SiteList groupId={active.groupId} canManage={canManage} />
      </HydrationBoundary>
    </>
  );
}
