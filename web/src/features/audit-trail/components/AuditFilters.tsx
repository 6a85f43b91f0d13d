import { useState, type FormEvent } from 'react';
import type { AuditFacets } from '@shared/schemas/audit-events';
import { formatPlantDay, plantDay, type PlantClock } from '@shared/time';
import { roleLabels, type Role } from '@shared/schemas/roles';
import { Field, Input, Select } from '@web/components/ui/Field';
import { Button } from '@web/components/ui/Button';
import { PlantDateInput } from '@web/components/PlantDateInput';
import { plantDateError, readPlantInput } from '@web/lib/plant-dates';
import type { AuditQuery } from '../api/audit-events';

const roleWord = (role: string) => (Object.hasOwn(roleLabels, role) ? roleLabels[role as Role] : role);

/** A plant day (YYYY-MM-DD) as the field shows it, and back. */
const dayText = (day: string | undefined, clock: PlantClock) => (day ? formatPlantDay(day, clock) : '');
function typedDay(text: string, clock: PlantClock): { day?: string; error?: string } {
  if (text.trim() === '') return {};
  const start = readPlantInput('date', text, clock);
  return start ? { day: plantDay(start, clock.timeZone) } : { error: plantDateError('date', clock) };
}

/** The filter form: kind of record, action, user, period in plant days, record id and words. Applied on "Show". */
export function AuditFilters({ query, facets, clock, onApply }: { query: AuditQuery; facets: AuditFacets | undefined; clock: PlantClock; onApply: (q: AuditQuery) => void }) {
  const [entity, setEntity] = useState(query.entity ?? '');
  const [action, setAction] = useState(query.action ?? '');
  const [actor, setActor] = useState(query.actor ?? '');
  const [from, setFrom] = useState(dayText(query.from, clock));
  const [to, setTo] = useState(dayText(query.to, clock));
  const [entityId, setEntityId] = useState(query.entityId ?? '');
  const [q, setQ] = useState(query.q ?? '');
  const [errors, setErrors] = useState<{ from?: string; to?: string }>({});

  const entities = facets?.entities ?? [];
  const actions = entity ? (entities.find((e) => e.entity === entity)?.actions ?? []) : [...new Set(entities.flatMap((e) => e.actions))].sort();

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const f = typedDay(from, clock);
    const t = typedDay(to, clock);
    const order = f.day && t.day && f.day > t.day ? 'The last day comes before the first day' : undefined;
    setErrors({ from: f.error, to: t.error ?? order });
    if (f.error || t.error || order) return;
    const next: AuditQuery = { entity, action, actor, from: f.day, to: t.day, entityId: entityId.trim(), q: q.trim() };
    onApply(Object.fromEntries(Object.entries(next).filter(([, v]) => v)) as AuditQuery);
  };

  const clear = () => {
    for (const set of [setEntity, setAction, setActor, setFrom, setTo, setEntityId, setQ]) set('');
    setErrors({});
    onApply({});
  };

  return (
    <form onSubmit={submit} aria-label="Filter the audit trail" className="rounded-lg border border-zinc-200 bg-white px-5 py-4 shadow-xs">
      <div className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <Field label="Kind of record">
          {(ids) => (
            <Select
              {...ids}
              value={entity}
              onChange={(e) => {
                setEntity(e.target.value);
                setAction('');
              }}
            >
              <option value="">Any</option>
              {entities.map((e) => (
                <option key={e.entity} value={e.entity}>
                  {e.entity}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="Action">
          {(ids) => (
            <Select {...ids} value={action} onChange={(e) => setAction(e.target.value)}>
              <option value="">Any</option>
              {actions.map((a) => (
                <option key={a} value={a}>
                  {a}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="Done by">
          {(ids) => (
            <Select {...ids} value={actor} onChange={(e) => setActor(e.target.value)}>
              <option value="">Anyone</option>
              {facets?.systemActs && <option value="system">The system (automatic)</option>}
              {facets?.actors.map((a) => (
                <option key={a.id} value={String(a.id)}>
                  {a.name} — {roleWord(a.role)}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="Record id or lot number" hint="Exactly as stored, e.g. a lot number.">
          {(ids) => <Input {...ids} value={entityId} maxLength={100} onChange={(e) => setEntityId(e.target.value)} />}
        </Field>
        <Field label="From (plant day)" error={errors.from}>
          {(ids) => <PlantDateInput kind="date" {...ids} value={from} onChange={(e) => setFrom(e.target.value)} />}
        </Field>
        <Field label="To (plant day, included)" error={errors.to}>
          {(ids) => <PlantDateInput kind="date" {...ids} value={to} onChange={(e) => setTo(e.target.value)} />}
        </Field>
        <Field label="Words" hint="Found in reasons, values and names." className="sm:col-span-2">
          {(ids) => <Input {...ids} type="search" value={q} maxLength={100} onChange={(e) => setQ(e.target.value)} />}
        </Field>
      </div>
      <div className="mt-4 flex flex-wrap gap-2">
        <Button type="submit">Show events</Button>
        <Button variant="quiet" onClick={clear}>
          Clear the filter
        </Button>
      </div>
    </form>
  );
}
