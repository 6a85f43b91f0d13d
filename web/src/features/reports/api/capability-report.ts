import { queryOptions, useQuery } from '@tanstack/react-query';
import { http } from '@web/lib/http';
import { capabilityReportSearch, type CapabilityReportPreview, type CapabilityReportQuery } from '@shared/schemas/reports';

export const reportKeys = {
  all: ['reports'] as const,
  capability: (search: string) => [...reportKeys.all, 'capability', search] as const,
};

/** Where the PDF and the CSV of a report are downloaded: the same query as the preview. */
export const capabilityReportUrl = (query: CapabilityReportQuery, kind: 'pdf' | 'csv') => `/api/v1/reports/capability.${kind}?${capabilityReportSearch(query)}`;

/** The audit pack of a product and period (built by the audit-pack route). */
export const auditPackUrl = (productId: number, from: string, to: string) =>
  `/api/v1/reports/audit-pack.zip?${new URLSearchParams({ product: String(productId), from, to })}`;

export const capabilityPreviewQueryOptions = (query: CapabilityReportQuery) => {
  const search = capabilityReportSearch(query);
  return queryOptions({
    queryKey: reportKeys.capability(search),
    queryFn: ({ signal }) => http<CapabilityReportPreview>(`/api/v1/reports/capability?${search}`, { signal }),
  });
};

/** The preview of the report asked for; nothing until a report is asked for. */
export function useCapabilityPreview(query: CapabilityReportQuery | null) {
  return useQuery({ ...capabilityPreviewQueryOptions(query ?? { from: '', to: '' }), enabled: query !== null });
}
