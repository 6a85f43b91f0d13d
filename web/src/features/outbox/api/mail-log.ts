import { keepPreviousData, queryOptions, useQuery } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import type { MailLogMessage, MailLogPage } from '@shared/schemas/mail-log';

export const mailLogKeys = {
  all: ['mail-log'] as const,
  page: (page: number, pageSize: number) => [...mailLogKeys.all, 'page', page, pageSize] as const,
  message: (id: number) => [...mailLogKeys.all, 'message', id] as const,
};

export const mailLogQueryOptions = (page: number, pageSize: number) =>
  queryOptions({
    queryKey: mailLogKeys.page(page, pageSize),
    queryFn: ({ signal }) => http<MailLogPage>(`/api/v1/mail-log?${new URLSearchParams({ page: String(page), pageSize: String(pageSize) })}`, { signal }),
    refetchInterval: 30_000,
    placeholderData: keepPreviousData,
  });

export const useMailLog = (page: number, pageSize: number) => useQuery(mailLogQueryOptions(page, pageSize));

export const useMailMessage = (id: number | null) =>
  useQuery({
    queryKey: mailLogKeys.message(id ?? 0),
    queryFn: ({ signal }) => http<MailLogMessage>(`/api/v1/mail-log/${id}`, { signal }),
    enabled: id !== null,
  });
