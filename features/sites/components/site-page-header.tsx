import Link from "next/link";
import type { ComponentProps } from "react";
import { PageHeader } from "@/lib/ui/page-header";

/** The header of a page about one site: a way back to the site above the title. */
export function SitePageHeader({
  site,
  ...header
}: { site: { id: number; name: string } } & Omit<ComponentProps<typeof PageHeader>, "eyebrow">) {
  return (
    <PageHeader
      {...header}
      eyebrow={
        <Link href={`/sites/${site.id}`} className="hover:underline">
          ← {site.name}
        </Link>
      }
    />
  );
}
