import { useMemo, useState, type FormEvent } from 'react';
import { useMay } from '@web/app/permissions';
import { PlantDateInput } from '@web/components/PlantDateInput';
import { PlantTime } from '@web/components/PlantTime';
import { Button } from '@web/components/ui/Button';
import { Card } from '@web/components/ui/Card';
import { ErrorState } from '@web/components/ui/ErrorState';
import { Field, Select } from '@web/components/ui/Field';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Loading } from '@web/components/ui/Spinner';
import { useCharacteristics, usePlantClock, useProducts } from '@web/lib/catalogue';
import { plantDateError, plantDateValue, readPlantInput } from '@web/lib/plant-dates';
import { capabilityReportQuerySchema, type CapabilityReportQuery } from '@shared/schemas/reports';
import { FALLBACK_PLANT_CLOCK, formatPlantDay, plantDay, type PlantClock } from '@shared/time';
import { auditPackUrl, capabilityReportUrl, useCapabilityPreview } from '../api/capability-report';
import { PreviewTable } from '../components/PreviewTable';

/** The default period: the last 182 plant days up to today, the chart page's longest day period. */
function defaultPeriod(clock: PlantClock) {
  const now = Date.now();
  return { from: plantDateValue('date', new Date(now - 181 * 86_400_000), clock), to: plantDateValue('date', new Date(now), clock) };
}

interface Errors {
  product?: string;
  characteristics?: string;
  from?: string;
  to?: string;
}

/**
 * Capability reports: an auditor or manager picks a product, its characteristics (all or some) and a
 * period of plant days, sees the figures the report will carry, and downloads it as PDF or CSV.
 */
export default function ReportsPage() {
  const clockQuery = usePlantClock();
  const clock = clockQuery.data ?? FALLBACK_PLANT_CLOCK;
  const products = useProducts();
  const characteristics = useCharacteristics();
  const mayAudit = useMay('audit.read');

  const [productId, setProductId] = useState<number | null>(null);
  const [chosen, setChosen] = useState<Set<number> | null>(null);
  const [typed, setTyped] = useState<{ from: string; to: string } | null>(null);
  const [errors, setErrors] = useState<Errors>({});
  const [applied, setApplied] = useState<CapabilityReportQuery | null>(null);
  const period = typed ?? defaultPeriod(clock);

  const productList = useMemo(() => (products.data ?? []).filter((p) => p.active), [products.data]);
  const ofProduct = useMemo(
    () => (characteristics.data ?? []).filter((c) => c.productId === productId && c.active).sort((a, b) => (a.code < b.code ? -1 : 1)),
    [characteristics.data, productId],
  );
  const selected = chosen ?? new Set(ofProduct.map((c) => c.id));
  const preview = useCapabilityPreview(applied);

  function toggle(id: number) {
    const next = new Set(selected);
    if (next.has(id)) next.delete(id);
    else next.add(id);
    setChosen(next);
  }

  function submit(e: FormEvent) {
    e.preventDefault();
    const found: Errors = {};
    const from = readPlantInput('date', period.from, clock);
    const to = readPlantInput('date', period.to, clock);
    if (productId === null) found.product = 'Choose a product';
    if (productId !== null && selected.size === 0) found.characteristics = 'Choose at least one characteristic';
    if (!from) found.from = plantDateError('date', clock);
    if (!to) found.to = plantDateError('date', clock);
    if (Object.keys(found).length === 0) {
      const ids = ofProduct.filter((c) => selected.has(c.id)).map((c) => c.id);
      const query =
        ids.length === 1
          ? { characteristic: ids[0], from: plantDay(from!, clock.timeZone), to: plantDay(to!, clock.timeZone) }
          : { product: productId!, characteristics: ids.length === ofProduct.length ? undefined : ids.join(','), from: plantDay(from!, clock.timeZone), to: plantDay(to!, clock.timeZone) };
      // The API's own schema: the page refuses what the API would (an end before the start, more than five years).
      const parsed = capabilityReportQuerySchema.safeParse(query);
      if (parsed.success) {
        setErrors({});
        setApplied(parsed.data);
        return;
      }
      for (const issue of parsed.error.issues) found[issue.path[0] === 'from' ? 'from' : 'to'] ??= issue.message;
    }
    setErrors(found);
  }

  if (clockQuery.isError || products.isError || characteristics.isError) return <ErrorState error={clockQuery.error ?? products.error ?? characteristics.error} />;

  return (
    <div className="space-y-6">
      <PageHeader
        title="Capability reports"
        description="Capability of a product's characteristics over a period, with control charts, signals, NCRs, limit revisions and exclusions — as a PDF to file and a CSV to check the figures."
      />
      <Card title="What the report covers">
        <form onSubmit={submit} noValidate className="space-y-5">
          <Field label="Product" error={errors.product} className="max-w-md">
            {(ids) => (
              <Select
                {...ids}
                value={productId ?? ''}
                onChange={(e) => {
                  setProductId(e.target.value ? Number(e.target.value) : null);
                  setChosen(null);
                }}
              >
                <option value="">Choose a product…</option>
                {productList.map((p) => (
                  <option key={p.id} value={p.id}>
                    {p.code} · {p.name}
                  </option>
                ))}
              </Select>
            )}
          </Field>
          {productId !== null && (
            <fieldset className="space-y-2" aria-describedby={errors.characteristics ? 'characteristics-error' : undefined}>
              <legend className="text-sm font-medium text-zinc-800">Characteristics</legend>
              <div className="flex gap-3 text-sm">
                <button type="button" className="text-accent-800 underline" onClick={() => setChosen(null)}>
                  All
                </button>
                <button type="button" className="text-accent-800 underline" onClick={() => setChosen(new Set())}>
                  None
                </button>
              </div>
              <div className="grid gap-x-6 gap-y-1 sm:grid-cols-2">
                {ofProduct.map((c) => (
                  <label key={c.id} className="flex items-start gap-2 text-base text-zinc-800">
                    <input type="checkbox" className="mt-1.5" checked={selected.has(c.id)} onChange={() => toggle(c.id)} />
                    <span>
                      <span className="font-medium">{c.code}</span> <span className="text-zinc-600">{c.name}</span>
                    </span>
                  </label>
                ))}
              </div>
              {errors.characteristics && (
                <p id="characteristics-error" className="text-sm text-red-700">
                  {errors.characteristics}
                </p>
              )}
            </fieldset>
          )}
          <div className="flex flex-wrap items-start gap-4">
            <Field label="From" error={errors.from} hint={`As ${clock.dateFormat.toLowerCase()}, first plant day.`}>
              {(ids) => <PlantDateInput kind="date" {...ids} value={period.from} onChange={(e) => setTyped({ ...period, from: e.target.value })} />}
            </Field>
            <Field label="To" error={errors.to} hint="Last plant day, included.">
              {(ids) => <PlantDateInput kind="date" {...ids} value={period.to} onChange={(e) => setTyped({ ...period, to: e.target.value })} />}
            </Field>
          </div>
          <Button type="submit" busy={preview.isFetching}>
            Show the figures
          </Button>
        </form>
      </Card>

      {applied && preview.isPending && <Loading label="Computing the report…" />}
      {applied && preview.isError && <ErrorState title="Could not compute the report" error={preview.error} onRetry={() => preview.refetch()} />}
      {applied && preview.data && (
        <Card title={`${preview.data.product.code} · ${preview.data.product.name}, ${formatPlantDay(preview.data.period.from, clock)} to ${formatPlantDay(preview.data.period.to, clock)}`}>
          <div className="space-y-4">
            <div className="flex flex-wrap gap-3">
              <a className="inline-flex h-10 items-center rounded-md bg-accent-700 px-4 text-base font-medium text-white hover:bg-accent-800" href={capabilityReportUrl(applied, 'pdf')} download>
                Download PDF
              </a>
              <a className="inline-flex h-10 items-center rounded-md border border-zinc-300 bg-white px-4 text-base font-medium text-zinc-800 hover:bg-zinc-100" href={capabilityReportUrl(applied, 'csv')} download>
                Download CSV
              </a>
              {mayAudit && (
                <a
                  className="inline-flex h-10 items-center rounded-md border border-zinc-300 bg-white px-4 text-base font-medium text-zinc-800 hover:bg-zinc-100"
                  href={auditPackUrl(preview.data.product.id, preview.data.period.from, preview.data.period.to)}
                  download
                >
                  Download audit pack (ZIP)
                </a>
              )}
            </div>
            <PreviewTable preview={preview.data} />
            <p className="text-sm text-zinc-600">
              Production from <PlantTime at={preview.data.period.fromInstant} /> to <PlantTime at={preview.data.period.toInstant} />. The figures are the chart page's for
              the same period; indices use the specification revision in force now. Input data SHA-256{' '}
              <code className="font-mono text-xs [overflow-wrap:anywhere]">{preview.data.inputHash}</code> — the PDF's footer and the CSV carry the same, so two copies
              can be compared.
            </p>
          </div>
        </Card>
      )}
    </div>
  );
}
