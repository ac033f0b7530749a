import { redirect } from "next/navigation";

type Props = { params: Promise<{ siteId: string }> };

// The evenings of a site are browsed through the calendar.
export default async function EveningsIndex({ params }: Props) {
  redirect(`/sites/${encodeURIComponent((await params).siteId)}/calendar`);
}
