"use client";

import { ErrorNotice } from "@/lib/ui/error-notice";

// Errors of a signed-in page: shown inside the frame, so the navigation stays usable.
export default function SignedInError({ error, retry }: { error: unknown; retry: () => void }) {
  return <ErrorNotice title="This page could not be shown" error={error} retry={retry} />;
}
