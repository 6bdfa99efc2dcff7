"use client";

import { QueryClient, QueryClientProvider } from "@tanstack/react-query";
import { useState, type ReactNode } from "react";
import { ApiProblem } from "@/components/data/api";

// One query client per browser tab. Authentication and permission answers are final, so they are
// not retried; other failures get one retry (a restarting server, a dropped connection).
function makeClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        staleTime: 15_000,
        refetchOnWindowFocus: false,
        retry: (count, error) =>
          !(error instanceof ApiProblem && error.status >= 400 && error.status < 500) && count < 1,
      },
    },
  });
}

export function Providers({ children }: { children: ReactNode }) {
  const [client] = useState(makeClient);
  return <QueryClientProvider client={client}>{children}</QueryClientProvider>;
}
