import { useState } from 'react';
import { useLines, usePlantClock, useProducts } from '@web/lib/catalogue';
import { useMay } from '@web/app/permissions';
import { useProcessEvents, type EventPeriod } from '../api/process-events';
import { plantIso, type PlantClock } from '@shared/time';
import { plantDateError, plantDayAfter, readPlantInput } from '@web/lib/plant-dates';
import { PlantTime } from '@web/components/PlantTime';
import { PlantDateInput } from '@web/components/PlantDateInput';
import { ProcessEventForm, type RecordedEvent } from '../components/ProcessEventForm';
import { ProcessEventList } from '../components/ProcessEventList';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Card } from '@web/components/ui/Card';
import { Alert } from '@web/components/ui/Alert';
import { Field } from '@web/components/ui/Field';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

/** Where the marker of an event shows, as the chart endpoint selects events: product, else line, else everywhere. */
function markerScope(event: RecordedEvent): string {
  if (event.productCode) return `the control charts of ${event.productCode}`;
  if (event.lineCode) return `the control charts of line ${event.lineCode}`;
  return 'every control chart';
}

/** A typed day of the filter: blank is an open end, unreadable text is named under the field and leaves that end open. */
function typedDay(text: string, clock: PlantClock | undefined): { day?: Date; error?: string } {
  if (!clock || text.trim() === '') return {};
  const day = readPlantInput('date', text, clock);
  return day ? { day } : { error: plantDateError('date', clock) };
}

/** One end of the period. A half-typed day is not yet wrong: its message waits until the field is left. */
function DayField({ label, text, onText, unreadable, error }: { label: string; text: string; onText: (text: string) => void; unreadable?: string; error?: string }) {
  const [left, setLeft] = useState(false);
  return (
    <Field label={label} className="w-44" error={(left ? unreadable : undefined) ?? error}>
      {(ids) => (
        <PlantDateInput
          kind="date"
          {...ids}
          value={text}
          onChange={(e) => {
            onText(e.target.value);
            setLeft(false);
          }}
          onBlur={() => setLeft(true)}
        />
      )}
    </Field>
  );
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
  const clock = usePlantClock().data;
  const from = typedDay(fromDate, clock);
  const to = typedDay(toDate, clock);
  // The end date counts in full: the period runs to the start of the plant's next day.
  const period: EventPeriod =
    clock === undefined ? {} : { from: from.day && plantIso(from.day, clock.timeZone), to: to.day && plantIso(plantDayAfter(to.day, clock), clock.timeZone) };
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
            ) : lines.data && products.data && clock ? (
              <ProcessEventForm lines={lines.data} products={products.data} clock={clock} onRecorded={setRecorded} />
            ) : (
              <Loading label="Loading the lines and products…" />
            )}
          </Card>
        )}
        {recorded && (
          <Alert tone="success">
            Recorded “{recorded.title}”, <span className="font-mono"><PlantTime at={recorded.occurredAt} /></span>. It appears as a marker on {markerScope(recorded)}.
            {!inPeriod(recorded.occurredAt, period) && ' It lies outside the period listed below.'}
          </Alert>
        )}

        <section aria-labelledby="event-list">
          <h2 id="event-list" className="text-lg font-semibold text-zinc-900">
            Recorded events
          </h2>
          <div className="mt-2 mb-4 flex flex-wrap items-start gap-4">
            <DayField label="From (optional)" text={fromDate} onText={setFromDate} unreadable={from.error} error={backwards ? 'The period ends before it starts' : undefined} />
            <DayField label="To (optional)" text={toDate} onText={setToDate} unreadable={to.error} />
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
