"use client";

/** The server's reference for an error (its digest), when the error carries one. */
export function errorDigest(error: unknown): string | null {
  return error instanceof Error && "digest" in error ? String(error.digest) : null;
}

/**
 * What an error boundary shows: a plain message, the error's reference for the server log, and
 * "Try again" (Next's `retry`, which fetches the segment again). Never the error's text or stack.
 */
export function ErrorNotice({
  title,
  error,
  retry,
  className = "max-w-xl",
}: {
  title: string;
  error: unknown;
  retry: () => void;
  className?: string;
}) {
  const digest = errorDigest(error);
  return (
    <div role="alert" className={`${className} space-y-3 card p-6`}>
      <h1 className="text-lg font-semibold">{title}</h1>
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
