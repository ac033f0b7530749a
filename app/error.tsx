"use client";

// Errors below the root layout, including the signed-in frame's own (its layout reads the session).
export default function AppError({ error, retry }: { error: unknown; retry: () => void }) {
  const digest = error instanceof Error && "digest" in error ? String(error.digest) : null;
  return (
    <main id="main" className="grid min-h-dvh place-items-center px-4">
      <div role="alert" className="max-w-md space-y-3 card p-6">
        <h1 className="text-lg font-semibold">Gloaming could not show this page</h1>
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
    </main>
  );
}
