import { QueryClient } from '@tanstack/react-query';
import { ApiError } from './api';

/** The app's query client: client errors (4xx) are answers, so only network and server errors retry. */
export function makeQueryClient(): QueryClient {
  return new QueryClient({
    defaultOptions: {
      queries: {
        retry: (count, e) => !(e instanceof ApiError && e.status >= 400 && e.status < 500) && count < 2,
        refetchOnWindowFocus: false,
      },
      mutations: { retry: false },
    },
  });
}
