"use client";

// Errors of a signed-in page: shown inside the frame, so the navigation stays usable.
export default function SignedInError({ error, retry }: { error: unknown; retry: () => void }) {
  const digest = error instanceof Error && "digest" in error ? String(error.digest) : null;
  return (
    <div role="alert" className="max-w-xl space-y-3 card p-6">
      <h1 className="text-lg font-semibold">This page could not be shown</h1>
      <p className="text-sm text-ink-muted">
        Something went wrong on our side, often because the database is restarting. Nothing you entered was
        changed. Wait a moment and try again.
        {digest ? (
          <>
            {" "}
            Reference: <code className="font-mono">{digest}</code>.
          </>
        ) : null}
      </p>
      <button type="button" className="btn-quiet" onClick={() => retry()}>
        Try again
      </button>
    </div>
  );
}
