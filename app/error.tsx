"use client";

import { ErrorNotice } from "@/lib/ui/error-notice";

// Errors below the root layout, including the signed-in frame's own (its layout reads the session).
export default function AppError({ error, retry }: { error: unknown; retry: () => void }) {
  return (
    <main id="main" className="grid min-h-dvh place-items-center px-4">
      <ErrorNotice
        title="Gloaming could not show this page"
        error={error}
        retry={retry}
        className="max-w-md"
      />
    </main>
  );
}
