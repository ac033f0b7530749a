"use client";

import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { useState, type ReactNode } from "react";
import { z } from "zod";

// zod probes for eval with Function(""); under the app's Content-Security-Policy (no
// 'unsafe-eval') that probe is a reported violation. Its interpreted path needs no eval.
z.config({ jitless: true });

/** One QueryClient per browser tab; server pages hydrate it through HydrationBoundary. */
export function QueryProvider({ children }: { children: ReactNode }) {
  const [client] = useState(
    () =>
      new QueryClient({
        defaultOptions: {
          // Server-rendered data is fresh on arrival; refetching it at once would be waste.
          queries: { staleTime: 60_000, refetchOnWindowFocus: true, retry: 1 },
        },
      }),
  );
  return <QueryClientProvider client={client}>{children}</QueryClientProvider>;
}
