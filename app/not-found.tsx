import Link from "next/link";

export default function NotFound() {
  return (
    <main id="main" className="grid min-h-dvh place-items-center px-4">
      <div className="max-w-md space-y-3 card p-6 text-center">
        <h1 className="text-lg font-semibold">Page not found</h1>
        <p className="text-sm text-ink-muted">This address does not lead anywhere in Gloaming.</p>
        <Link href="/" className="btn-quiet">
          Go to the start
        </Link>
      </div>
    </main>
  );
}
