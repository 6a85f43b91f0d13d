import { queryOptions, useQuery } from '@tanstack/react-query';
import { http } from '@web/lib/http';

export interface CapturedMessage {
  id: number;
  receivedAt: string;
  recipients: string[];
  from: string;
  subject: string;
  text: string;
  html: string;
}

export const outboxKeys = { all: ['outbox'] as const };

export async function fetchOutbox(signal?: AbortSignal): Promise<CapturedMessage[]> {
  const { items } = await http<{ items: CapturedMessage[] }>('/api/v1/dev/outbox', { signal });
  return items;
}

export const outboxQueryOptions = () =>
  queryOptions({
    queryKey: outboxKeys.all,
    queryFn: ({ signal }) => fetchOutbox(signal),
    refetchInterval: 5000,
    retry: false,
  });

export const useOutbox = () => useQuery(outboxQueryOptions());
