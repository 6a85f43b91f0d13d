import { useState } from 'react';
import { useLines, useProducts } from '@web/lib/catalogue';
import { useMay } from '@web/app/permissions';
import { useProcessEvents, type EventPeriod } from '../api/process-events';
import { browserTimeZone, formatWithZone, localDateToIso } from '@web/lib/date-time';
import { ProcessEventForm, type RecordedEvent } from '../components/ProcessEventForm';
import { ProcessEventList } from '../components/ProcessEventList';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Card } from '@web/components/ui/Card';
import { Alert } from '@web/components/ui/Alert';
import { Field, Input } from '@web/components/ui/Field';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

/** Where the marker of an event shows, as the chart endpoint selects events: product, else line, else everywhere. */
function markerScope(event: RecordedEvent): string {
  if (event.productCode) return `the control charts of ${event.productCode}`;
  if (event.lineCode) return `the control charts of line ${event.lineCode}`;
  return 'every control chart';
}

function inPeriod(iso: string, period: EventPeriod): boolean {
  const t = Date.parse(iso);
  return (!period.from || t >= Date.parse(period.from)) && (!period.to || t < Date.parse(period.to));
}

/** /records/events: what happened at the plant, for everyone to read and the lab staff to record. */
export default function ProcessEventsPage() {
  const canRecord = useMay('process-event.create');
  const [fromDate, setFromDate] = useState('');
  const [toDate, setToDate] = useState('');
  // The end date counts in full: the period runs to the start of the next day.
  const period: EventPeriod = { from: localDateToIso(fromDate), to: localDateToIso(toDate, 1) };
  const backwards = !!period.from && !!period.to && Date.parse(period.to) <= Date.parse(period.from);
  const events = useProcessEvents(period);
  const lines = useLines();
  const products = useProducts();
  const [recorded, setRecorded] = useState<RecordedEvent | null>(null);

  return (
    <>
      <PageHeader
        title="Process events"
        description="Things that happened at the plant or in the lab and may explain a change on a chart, such as a new sand source or a recalibrated press. Each event appears as a marker on the control charts of its product, its line, or the whole plant."
      />
      <div className="space-y-6">
        {canRecord && (
          <Card title="Record an event">
            {lines.isError || products.isError ? (
              <ErrorState
                title="Could not load the lines and products"
                error={lines.error ?? products.error}
                onRetry={() => {
                  if (lines.isError) lines.refetch();
                  if (products.isError) products.refetch();
                }}
              />
            ) : lines.data && products.data ? (
              <ProcessEventForm lines={lines.data} products={products.data} onRecorded={setRecorded} />
            ) : (
              <Loading label="Loading the lines and products…" />
            )}
          </Card>
        )}
        {recorded && (
          <Alert tone="success">
            Recorded “{recorded.title}”, <span className="font-mono">{formatWithZone(recorded.occurredAt)}</span>. It appears as a marker on {markerScope(recorded)}.
            {!inPeriod(recorded.occurredAt, period) && ' It lies outside the period listed below.'}
          </Alert>
        )}

        <section aria-labelledby="event-list">
          <h2 id="event-list" className="text-lg font-semibold text-zinc-900">
            Recorded events
          </h2>
          <div className="mt-2 mb-4 flex flex-wrap items-start gap-4">
            <Field label="From (optional)" className="w-44" error={backwards ? 'The period ends before it starts' : undefined}>
              {(ids) => <Input {...ids} type="date" value={fromDate} onChange={(e) => setFromDate(e.target.value)} />}
            </Field>
            <Field label="To (optional)" className="w-44">
              {(ids) => <Input {...ids} type="date" value={toDate} onChange={(e) => setToDate(e.target.value)} />}
            </Field>
            <p className="self-end pb-2 text-sm text-zinc-600">Days and times in your browser's time zone, {browserTimeZone()}.</p>
          </div>
          {events.isPending ? (
            <Loading label="Loading the events…" />
          ) : events.isError ? (
            <ErrorState title="Could not load the events" error={events.error} onRetry={() => events.refetch()} />
          ) : events.data.length === 0 ? (
            <EmptyState title={period.from || period.to ? 'No events in this period' : 'No events recorded yet'}>
              {canRecord ? 'Record one with the form above.' : 'Technicians and quality managers record them.'}
            </EmptyState>
          ) : (
            <ProcessEventList events={events.data} />
          )}
        </section>
      </div>
    </>
  );
}
