import { queryOptions, useQuery } from '@tanstack/react-query';
import { http } from './http';
import type { TestMethodView } from '@shared/schemas/catalogue';

/** A test method as GET /api/v1/test-methods gives it. */
export type TestMethodEntry = TestMethodView;

export const testMethodKeys = {
  all: ['test-methods'] as const,
};

export async function fetchTestMethods(signal?: AbortSignal): Promise<TestMethodEntry[]> {
  const { items } = await http<{ items: TestMethodEntry[] }>('/api/v1/test-methods', { signal });
  return items;
}

export const testMethodsQueryOptions = () =>
  queryOptions({
    queryKey: testMethodKeys.all,
    queryFn: ({ signal }) => fetchTestMethods(signal),
    // Reference data that changes only with a release.
    staleTime: Infinity,
  });

export function useTestMethods() {
  return useQuery(testMethodsQueryOptions());
}
