"use client";

import { errorDigest } from "@/lib/ui/error-notice";

/*
 * Last resort when even the root layout fails. It replaces the whole document and gets none of
 * the app's styles, so it carries its own few rules and follows the system colour scheme.
 */
export default function GlobalError({ error, retry }: { error: unknown; retry: () => void }) {
  const digest = errorDigest(error);
  return (
    <html lang="en">
      <body style={{ margin: 0, fontFamily: "system-ui, sans-serif", colorScheme: "light dark" }}>
        <title>Gloaming could not start this page</title>
        <main style={{ display: "grid", minHeight: "100dvh", placeItems: "center", padding: "1rem" }}>
          <div role="alert" style={{ maxWidth: "28rem", lineHeight: 1.5 }}>
            <h1 style={{ fontSize: "1.125rem" }}>Gloaming could not show this page</h1>
            <p>
              Something went wrong on our side, often because the database is restarting. Nothing you entered
              was changed. Wait a moment and try again.
              {digest ? <> Reference: {digest}.</> : null}
            </p>
            <button type="button" onClick={() => retry()} style={{ padding: "0.5rem 1rem", font: "inherit" }}>
              Try again
            </button>
          </div>
        </main>
      </body>
    </html>
  );
}
