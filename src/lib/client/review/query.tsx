/**
 * One react-query client per page for the review islands (study page import, session page) and, later, the
 * workspace: cached reads refresh in the background when the window regains focus; writes are mutations.
 */
import { QueryClient, QueryClientProvider } from '@tanstack/react-query';
import { useState, type ReactNode } from 'react';

export function makeReviewQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: { staleTime: 15_000, refetchOnWindowFocus: true, retry: 1 },
      mutations: { retry: 0 },
    },
  });
}

export function ReviewQueryProvider({ children, client }: { children: ReactNode; client?: QueryClient }) {
  const [own] = useState(() => client ?? makeReviewQueryClient());
  return <QueryClientProvider client={own}>{children}</QueryClientProvider>;
}
