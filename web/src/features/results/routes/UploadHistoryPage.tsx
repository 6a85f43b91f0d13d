import { useMemo, useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import { useMay } from '@web/app/permissions';
import type { UploadListItem, UploadStatus } from '@shared/schemas/uploads';
import { uploadLinks, useUploads } from '../api/uploads';
import { usePlantClock } from '@web/lib/catalogue';
import { FALLBACK_PLANT_CLOCK, formatPlantDateTime } from '@shared/time';
import { VoidUploadDialog } from '../components/VoidUploadDialog';
import { DownloadLink } from '../components/DownloadLink';
import { PageHeader } from '@web/components/ui/PageHeader';
import { DataTable } from '@web/components/ui/Table';
import { Badge } from '@web/components/ui/Badge';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Select } from '@web/components/ui/Field';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';
import { formatBytes, formatCount } from '@web/lib/format';

const column = createColumnHelper<UploadListItem>();

const statusBadge: Record<UploadStatus, { tone: 'positive' | 'negative' | 'neutral'; label: string }> = {
  imported: { tone: 'positive', label: 'Imported' },
  rejected: { tone: 'negative', label: 'Rejected' },
  voided: { tone: 'neutral', label: 'Voided' },
};

const statusFilters: { value: UploadStatus | ''; label: string }[] = [
  { value: '', label: 'All uploads' },
  { value: 'imported', label: 'Imported' },
  { value: 'rejected', label: 'Rejected' },
  { value: 'voided', label: 'Voided' },
];

export default function UploadHistoryPage() {
  const [params, setParams] = useSearchParams();
  const status = (statusFilters.find((f) => f.value === params.get('status'))?.value || undefined) as UploadStatus | undefined;
  const uploads = useUploads(status);
  const clockData = usePlantClock().data;
  const clock = clockData ?? FALLBACK_PLANT_CLOCK;
  const [voiding, setVoiding] = useState<UploadListItem | null>(null);
  const [notice, setNotice] = useState<string | null>(null);
  const canVoid = useMay('upload.void');
  const canUpload = useMay('upload.create');

  const columns = useMemo(
    () => [
      column.accessor('uploadedAt', {
        header: 'Uploaded, by',
        cell: (info) => (
          <>
            <span className="block font-mono text-sm whitespace-nowrap">{formatPlantDateTime(info.getValue(), clock)}</span>
            <span className="block text-sm text-zinc-600">{info.row.original.uploadedByName ?? '—'}</span>
          </>
        ),
      }),
      column.accessor('fileName', {
        header: 'File',
        cell: (info) => (
          <div className="min-w-40">
            <span className="block font-medium [overflow-wrap:break-word]">{info.getValue()}</span>
            <span className="block text-sm text-zinc-600">
              Upload <span className="font-mono">{info.row.original.id}</span> · {info.row.original.format === 'wide' ? 'one row per lot' : 'one result per row'}
            </span>
          </div>
        ),
      }),
      column.accessor('status', {
        header: 'Status',
        cell: (info) => {
          const upload = info.row.original;
          return (
            <>
              <Badge tone={statusBadge[upload.status].tone}>{statusBadge[upload.status].label}</Badge>
              {upload.status === 'voided' && upload.voidReason && <span className="mt-1 block max-w-xs text-sm text-zinc-600">{upload.voidReason}</span>}
            </>
          );
        },
      }),
      column.accessor('rowsTotal', { header: 'Rows', meta: { numeric: true }, cell: (info) => formatCount(info.getValue()) }),
      column.accessor('rowsImported', { header: 'Results stored', meta: { numeric: true }, cell: (info) => formatCount(info.getValue()) }),
      column.accessor('rowsRejected', { header: 'Rejected', meta: { numeric: true }, cell: (info) => formatCount(info.getValue()) }),
      column.display({
        id: 'actions',
        header: 'Actions',
        cell: (info) => {
          const upload = info.row.original;
          return (
            <div className="flex flex-col items-start gap-1 text-sm whitespace-nowrap">
              <DownloadLink href={uploadLinks.file(upload.id)}>Original file ({formatBytes(upload.sizeBytes)})</DownloadLink>
              {upload.status === 'rejected' && <DownloadLink href={uploadLinks.errorReport(upload.id)}>Error report</DownloadLink>}
              {upload.status === 'imported' && canVoid && (
                <Button variant="secondary" size="sm" onClick={() => setVoiding(upload)}>
                  Void…
                </Button>
              )}
            </div>
          );
        },
      }),
    ],
    [clock, canVoid],
  );

  const table = useReactTable({ data: uploads.data ?? [], columns, enableSorting: false, getCoreRowModel: getCoreRowModel() });

  return (
    <>
      <PageHeader
        title="Upload history"
        description={`Every file uploaded, who uploaded it and what became of it. A rejected file stored nothing; its error report lists the rows to correct.`}
        actions={<DownloadLink href={uploadLinks.template}>Download the CSV template</DownloadLink>}
      />
      <div className="space-y-4">
        <div className="flex flex-wrap items-center gap-3">
          <label htmlFor="upload-status" className="text-sm font-medium text-zinc-800">
            Show
          </label>
          <div className="w-48">
            <Select id="upload-status" value={status ?? ''} onChange={(event) => setParams(event.target.value ? { status: event.target.value } : {})}>
              {statusFilters.map((f) => (
                <option key={f.value} value={f.value}>
                  {f.label}
                </option>
              ))}
            </Select>
          </div>
        </div>
        {notice && <Alert tone="success">{notice}</Alert>}
        {uploads.isPending ? (
          <Loading label="Loading uploads…" />
        ) : uploads.isError ? (
          <ErrorState title="Could not load the upload history" error={uploads.error} onRetry={() => uploads.refetch()} />
        ) : uploads.data.length === 0 && !status ? (
          <EmptyState title="No uploads yet — upload the shift's results or download the template">
            <span className="inline-flex flex-wrap justify-center gap-4">
              {canUpload && (
                <Link to="/results/upload" className="font-medium text-accent-800 underline underline-offset-2">
                  Upload a file
                </Link>
              )}
              <DownloadLink href={uploadLinks.template}>Download the CSV template</DownloadLink>
            </span>
          </EmptyState>
        ) : (
          <DataTable table={table} caption="Uploads, newest first" empty={<EmptyState title="No upload in this state" />} />
        )}
      </div>
      {voiding && (
        <VoidUploadDialog
          upload={voiding}
          onClose={() => setVoiding(null)}
          onVoided={(count) => {
            setNotice(`Upload ${voiding.id} is void: ${count} result${count === 1 ? '' : 's'} left every calculation and stay in the record.`);
            setVoiding(null);
          }}
        />
      )}
    </>
  );
}
