import Link from "next/link";

export default function SiteNotFound() {
  return (
    <div className="max-w-xl space-y-3 card p-6">
      <h1 className="text-lg font-semibold">Site not found</h1>
      <p className="text-sm text-ink-muted">
        There is no such site in your groups. It may have been deleted, or it belongs to a group you are not a
        member of.
      </p>
      <Link href="/sites" className="btn-quiet">
        Back to sites
      </Link>
    </div>
  );
}
