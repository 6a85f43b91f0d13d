import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { http } from '@web/lib/http';

export interface Subscription {
  id: number;
  lineId: number | null;
  lineCode: string | null;
  lineName: string | null;
  productId: number | null;
  productCode: string | null;
  productName: string | null;
  immediate: boolean;
  digest: boolean;
}

export interface NewSubscription {
  lineId?: number;
  productId?: number;
  immediate: boolean;
  digest: boolean;
}

export interface Scope {
  lines: { id: number; code: string; name: string }[];
  products: { id: number; code: string; name: string; lineCode: string | null }[];
}

export const subscriptionKeys = {
  all: ['subscriptions'] as const,
  mine: () => [...subscriptionKeys.all, 'mine'] as const,
  scope: () => [...subscriptionKeys.all, 'scope'] as const,
};

export async function fetchSubscriptions(signal?: AbortSignal): Promise<Subscription[]> {
  const { items } = await http<{ items: Subscription[] }>('/api/v1/subscriptions', { signal });
  return items;
}

/** The product lines and products one can subscribe to. */
export async function fetchScope(signal?: AbortSignal): Promise<Scope> {
  const [lines, products] = await Promise.all([
    http<{ items: Scope['lines'] }>('/api/v1/lines', { signal }),
    http<{ items: (Scope['products'][number] & { active: boolean })[] }>('/api/v1/products', { signal }),
  ]);
  return { lines: lines.items, products: products.items.filter((p) => p.active) };
}

export const createSubscription = (input: NewSubscription) => http<Subscription>('/api/v1/subscriptions', { method: 'POST', body: input });
export const updateSubscription = ({ id, ...changes }: { id: number; immediate?: boolean; digest?: boolean }) =>
  http<Subscription>(`/api/v1/subscriptions/${id}`, { method: 'PATCH', body: changes });
export const deleteSubscription = (id: number) => http<void>(`/api/v1/subscriptions/${id}`, { method: 'DELETE' });

export const subscriptionsQueryOptions = () => queryOptions({ queryKey: subscriptionKeys.mine(), queryFn: ({ signal }) => fetchSubscriptions(signal) });
export const scopeQueryOptions = () => queryOptions({ queryKey: subscriptionKeys.scope(), queryFn: ({ signal }) => fetchScope(signal), staleTime: 5 * 60_000 });

export const useSubscriptions = () => useQuery(subscriptionsQueryOptions());
export const useScope = () => useQuery(scopeQueryOptions());

function useInvalidating<A, R>(fn: (a: A) => Promise<R>) {
  const queryClient = useQueryClient();
  return useMutation({ mutationFn: fn, onSuccess: () => queryClient.invalidateQueries({ queryKey: subscriptionKeys.mine() }) });
}

export const useCreateSubscription = () => useInvalidating(createSubscription);
export const useUpdateSubscription = () => useInvalidating(updateSubscription);
export const useDeleteSubscription = () => useInvalidating(deleteSubscription);
