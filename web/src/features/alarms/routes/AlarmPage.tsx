import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { alarmOutcomes, alarmOutcomeWords, alarmStepWords, type AlarmDetail, type AlarmOutcome, type AlarmStatus } from '@shared/schemas/alarms';
import { formatFigure } from '@shared/figures';
import { causeCategories, causeCategoryWords, type CauseCategory } from '@shared/schemas/causes';
import { useAlarm, useCommentOnAlarm, usePatchAlarm } from '../api/alarms';
import { alarmPath, chartPath, fieldMessages, raiseNcrPath, signalTone, statusTone, statusWord } from '../lib/alarm-words';
import { usePeople } from '@web/lib/people';
import { lotPath } from '@web/lib/lots';
import { errorMessage } from '@web/lib/http';
import { useMay } from '@web/app/permissions';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';
import { PageHeader } from '@web/components/ui/PageHeader';
import { PlantTime } from '@web/components/PlantTime';
import { LotStatusBadge } from '@web/components/LotStatusBadge';
import { Card } from '@web/components/ui/Card';
import { Badge } from '@web/components/ui/Badge';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Field, Select } from '@web/components/ui/Field';
import { TextArea } from '@web/components/ui/TextArea';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';

export default function AlarmPage() {
  const id = Number(useParams().alarmId);
  const valid = Number.isInteger(id) && id > 0 && id <= 2_147_483_647;
  const alarm = useAlarm(valid ? id : 0);
  if (!valid) return <NotFoundPage />;
  if (alarm.isPending) return <Loading label="Loading the alarm…" />;
  if (alarm.isError) return <ErrorState title="Could not load the alarm" error={alarm.error} onRetry={() => alarm.refetch()} />;
  return <AlarmDetailView alarm={alarm.data} />;
}

function AlarmDetailView({ alarm: a }: { alarm: AlarmDetail }) {
  const mayTriage = useMay('alarm.triage');
  const mayRaiseNcr = useMay('ncr.raise');
  const c = a.characteristic;
  return (
    <>
      <PageHeader
        title={`${a.signal} — ${c.code}, lot ${a.lot.lotNumber}`}
        description={
          <span className="flex flex-wrap gap-x-4 gap-y-1 font-medium">
            <Link className="text-accent-800 underline" to="/alarms">
              All alarms
            </Link>
            <Link className="text-accent-800 underline" to={chartPath(a)}>
              Chart at this lot
            </Link>
            <Link className="text-accent-800 underline" to={lotPath(a.lot.lotNumber)}>
              Lot page
            </Link>
            {mayRaiseNcr && (
              <Link className="text-accent-800 underline" to={raiseNcrPath([a.id])}>
                Raise NCR
              </Link>
            )}
          </span>
        }
      />
      <div className="grid gap-4 lg:grid-cols-3">
        <div className="space-y-4 lg:col-span-2">
          <Card title="What the chart shows">
            <div className="space-y-2">
              <div className="flex flex-wrap items-center gap-2">
                <Badge tone={signalTone(a.rule)}>{a.signal}</Badge>
                <Badge tone={statusTone(a.status)}>{statusWord(a.status)}</Badge>
                {a.late && <Badge tone="warning">Earlier position</Badge>}
              </div>
              <p>{a.description}</p>
              {a.ruleDescription && <p className="text-sm text-zinc-600">{a.ruleDescription}</p>}
              {a.lateReason && <p className="text-sm text-amber-900">{a.lateReason}</p>}
              <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
                <dt className="text-zinc-600">Characteristic</dt>
                <dd>
                  <span className="font-mono">{c.code}</span> · {c.name} ({c.productCode}
                  {c.lineCode ? `, line ${c.lineCode}` : ''})
                </dd>
                <dt className="text-zinc-600">Lot</dt>
                <dd className="flex flex-wrap items-center gap-2">
                  <Link className="font-mono text-accent-800 underline" to={lotPath(a.lot.lotNumber)}>
                    {a.lot.lotNumber}
                  </Link>
                  <span>
                    produced <PlantTime at={a.lot.producedAt} />
                  </span>
                  <LotStatusBadge status={a.lotStatus} />
                </dd>
                <dt className="text-zinc-600">{a.figure.name[0].toUpperCase() + a.figure.name.slice(1)}</dt>
                <dd className="figures">
                  {a.figure.text}
                  {a.limit && ` (${a.limit.name} ${a.limit.text})`}
                </dd>
                <dt className="text-zinc-600">Detected</dt>
                <dd>
                  <PlantTime at={a.detectedAt} />
                </dd>
                {a.values.length > 0 && (
                  <>
                    <dt className="text-zinc-600">Results</dt>
                    <dd className="figures">
                      {a.values.map((v) => formatFigure(v, c.decimals)).join(', ')} {c.unit}
                    </dd>
                  </>
                )}
                {a.acknowledgedBy && (
                  <>
                    <dt className="text-zinc-600">Acknowledged by {a.acknowledgedBy}</dt>
                    <dd>{a.acknowledgeNote ?? <PlantTime at={a.acknowledgedAt!} />}</dd>
                  </>
                )}
                {a.investigatingBy && (
                  <>
                    <dt className="text-zinc-600">Investigated by</dt>
                    <dd>
                      {a.investigatingBy}, since <PlantTime at={a.investigatingAt!} />
                    </dd>
                  </>
                )}
                {a.outcome && (
                  <>
                    <dt className="text-zinc-600">Outcome</dt>
                    <dd>
                      {alarmOutcomeWords[a.outcome]}
                      {a.causeCategory && ` — ${causeCategoryWords[a.causeCategory].label.toLowerCase()}`}
                    </dd>
                  </>
                )}
                {a.closeNote && (
                  <>
                    <dt className="text-zinc-600">{a.resolution === 'data-changed' ? 'Resolved' : `Closed by ${a.closedBy}`}</dt>
                    <dd>{a.closeNote}</dd>
                  </>
                )}
                {a.reopenReason && (
                  <>
                    <dt className="text-zinc-600">Reopened by {a.reopenedBy}</dt>
                    <dd>{a.reopenReason}</dd>
                  </>
                )}
              </dl>
            </div>
          </Card>
          {mayTriage && <TriageForm alarm={a} />}
          <Comments alarm={a} mayComment={mayTriage} />
          <Card title="History">
            {a.history.length === 0 ? (
              <p className="text-sm text-zinc-600">Nothing has been done on this alarm yet.</p>
            ) : (
              <ol className="space-y-1.5 text-sm" aria-label="History">
                {a.history.map((h, i) => (
                  <li key={i}>
                    <PlantTime at={h.at} className="figures text-zinc-600" /> — {h.actor ?? 'The SPC run'}: {historyWords[h.action] ?? h.action}
                    {h.reason && <span className="text-zinc-700"> — {h.reason}</span>}
                  </li>
                ))}
              </ol>
            )}
          </Card>
        </div>
        <div className="space-y-4">
          <Assignee alarm={a} mayAssign={mayTriage} />
          <Card title="Investigation">
            {a.group ? (
              <div className="space-y-2 text-sm">
                <p className="font-medium">{a.group.title}</p>
                {a.group.note && <p className="text-zinc-700">{a.group.note}</p>}
                <ul className="space-y-1" aria-label="Alarms of the investigation">
                  {a.group.members.map((m) => (
                    <li key={m.id}>
                      {m.id === a.id ? (
                        <span>This alarm</span>
                      ) : (
                        <Link className="text-accent-800 underline" to={alarmPath(m.id)}>
                          {m.signal}
                        </Link>
                      )}{' '}
                      — <span className="font-mono">{m.characteristicCode}</span>, lot <span className="font-mono">{m.lotNumber}</span> ({statusWord(m.status).toLowerCase()})
                    </li>
                  ))}
                </ul>
              </div>
            ) : (
              <p className="text-sm text-zinc-600">Not part of an investigation. Select several alarms in the list to group them under one.</p>
            )}
          </Card>
          <Card title="Nonconformance reports">
            {a.ncrs.length === 0 ? (
              <p className="text-sm text-zinc-600">No NCR names this alarm.</p>
            ) : (
              <ul className="space-y-1 text-sm">
                {a.ncrs.map((n) => (
                  <li key={n.id}>
                    <Link className="font-mono text-accent-800 underline" to={`/ncrs/${n.id}`}>
                      {n.number}
                    </Link>{' '}
                    ({n.status})
                  </li>
                ))}
              </ul>
            )}
          </Card>
        </div>
      </div>
    </>
  );
}

const historyWords: Record<string, string> = {
  acknowledge: 'acknowledged',
  investigate: 'started the investigation',
  close: 'closed',
  'close-automatically': 'closed, the data no longer show the signal',
  reopen: 'opened again',
  assign: 'changed the assignee',
  comment: 'commented',
  group: 'changed the investigation',
  'raise falling capability': 'raised the falling-capability alarm',
};

/** The next steps the flow allows, one button each; closing asks for the outcome, reopening for the reason. */
function TriageForm({ alarm: a }: { alarm: AlarmDetail }) {
  const [step, setStep] = useState<AlarmStatus | null>(null);
  const [outcome, setOutcome] = useState<AlarmOutcome | ''>('');
  const [cause, setCause] = useState<CauseCategory | ''>('');
  const [note, setNote] = useState('');
  const [exclude, setExclude] = useState(false);
  const patch = usePatchAlarm(a.id);
  const errors = fieldMessages(patch.error);
  const reset = () => {
    setStep(null);
    setOutcome('');
    setCause('');
    setNote('');
    setExclude(false);
  };
  const noteLabel = step === 'closed' ? 'What was checked and found' : step === 'open' ? 'Why it opens again' : 'Note (optional)';
  return (
    <Card title="Decide">
      <div className="space-y-3">
        <div className="flex flex-wrap gap-2" role="group" aria-label="Next step">
          {a.nextSteps.map((s) => (
            <Button key={s} variant={step === s ? 'primary' : 'secondary'} onClick={() => (patch.reset(), setStep(s))}>
              {alarmStepWords[s]}
            </Button>
          ))}
        </div>
        {step && (
          <form
            className="space-y-3"
            onSubmit={(e) => {
              e.preventDefault();
              patch.mutate(
                {
                  status: step,
                  ...(note.trim() ? { note: note.trim() } : {}),
                  ...(step === 'closed' && outcome ? { outcome } : {}),
                  ...(step === 'closed' && outcome === 'assignable-cause' && cause ? { causeCategory: cause } : {}),
                  ...(step === 'closed' && outcome === 'assignable-cause' && exclude ? { excludePoints: true } : {}),
                },
                { onSuccess: reset },
              );
            }}
          >
            {step === 'closed' && (
              <fieldset className="space-y-1.5">
                <legend className="text-sm font-medium text-zinc-800">Outcome</legend>
                {alarmOutcomes.map((o) => (
                  <label key={o} className="flex items-center gap-2">
                    <input type="radio" name="outcome" value={o} checked={outcome === o} onChange={() => setOutcome(o)} className="size-4" />
                    {alarmOutcomeWords[o]}
                  </label>
                ))}
                {errors.outcome && <p className="text-sm text-red-700">{errors.outcome}</p>}
              </fieldset>
            )}
            {step === 'closed' && outcome === 'assignable-cause' && (
              <>
                <Field label="Cause category" error={errors.causeCategory} hint={cause ? causeCategoryWords[cause].hint : 'The kind of cause, for the trend of causes over time.'}>
                  {(ids) => (
                    <Select id={ids.id} describedBy={ids.describedBy} invalid={ids.invalid} value={cause} onChange={(e) => setCause(e.target.value as CauseCategory)}>
                      <option value="">Choose…</option>
                      {causeCategories.map((k) => (
                        <option key={k} value={k}>
                          {causeCategoryWords[k].label} — {causeCategoryWords[k].hint}
                        </option>
                      ))}
                    </Select>
                  )}
                </Field>
                <label className="flex items-start gap-2 text-sm">
                  <input type="checkbox" className="mt-0.5 size-4" checked={exclude} onChange={(e) => setExclude(e.target.checked)} />
                  <span>
                    Leave this lot’s point out of the limit estimate (it stays on the chart, marked excluded; the note is recorded as the reason). The chart is
                    recalculated in a moment.
                  </span>
                </label>
              </>
            )}
            <Field label={noteLabel} error={errors.note}>
              {(ids) => <TextArea id={ids.id} describedBy={ids.describedBy} invalid={ids.invalid} value={note} onChange={(e) => setNote(e.target.value)} />}
            </Field>
            {patch.isError && !Object.keys(errors).some((k) => ['outcome', 'causeCategory', 'note'].includes(k)) && <Alert tone="error">{errorMessage(patch.error)}</Alert>}
            <div className="flex justify-end gap-2">
              <Button variant="secondary" onClick={reset}>
                Cancel
              </Button>
              <Button type="submit" busy={patch.isPending}>
                {step === 'closed' ? 'Close the alarm' : step === 'open' ? 'Reopen the alarm' : alarmStepWords[step]}
              </Button>
            </div>
          </form>
        )}
      </div>
    </Card>
  );
}

function Assignee({ alarm: a, mayAssign }: { alarm: AlarmDetail; mayAssign: boolean }) {
  const people = usePeople();
  const patch = usePatchAlarm(a.id);
  return (
    <Card title="Assignee">
      {mayAssign ? (
        <Field label="Who follows it up" hint="The person is told by e-mail." error={patch.isError ? errorMessage(patch.error) : undefined}>
          {(ids) => (
            <Select
              id={ids.id}
              describedBy={ids.describedBy}
              invalid={ids.invalid}
              value={a.assignee?.id ?? ''}
              disabled={patch.isPending || people.isPending}
              onChange={(e) => patch.mutate({ assigneeId: e.target.value ? Number(e.target.value) : null })}
            >
              <option value="">Nobody</option>
              {(people.data ?? []).map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name}
                </option>
              ))}
            </Select>
          )}
        </Field>
      ) : (
        <p className="text-sm">{a.assignee ? a.assignee.name : 'Nobody assigned'}</p>
      )}
    </Card>
  );
}

function Comments({ alarm: a, mayComment }: { alarm: AlarmDetail; mayComment: boolean }) {
  const [body, setBody] = useState('');
  const comment = useCommentOnAlarm(a.id);
  const errors = fieldMessages(comment.error);
  return (
    <Card title="Comments">
      <div className="space-y-3">
        {a.comments.length === 0 ? (
          <p className="text-sm text-zinc-600">No comment yet.</p>
        ) : (
          <ul className="space-y-2" aria-label="Comments">
            {a.comments.map((k) => (
              <li key={k.id} className="text-sm">
                <p className="text-zinc-600">
                  {k.author}, <PlantTime at={k.createdAt} />
                </p>
                <p className="whitespace-pre-line">{k.body}</p>
              </li>
            ))}
          </ul>
        )}
        {mayComment && (
          <form
            className="space-y-2"
            onSubmit={(e) => {
              e.preventDefault();
              comment.mutate(body.trim(), { onSuccess: () => setBody('') });
            }}
          >
            <Field label="Add a comment" error={errors.body ?? (comment.isError ? errorMessage(comment.error) : undefined)}>
              {(ids) => <TextArea id={ids.id} describedBy={ids.describedBy} invalid={ids.invalid} value={body} onChange={(e) => setBody(e.target.value)} />}
            </Field>
            <div className="flex justify-end">
              <Button type="submit" variant="secondary" busy={comment.isPending} disabled={!body.trim()}>
                Add the comment
              </Button>
            </div>
          </form>
        )}
      </div>
    </Card>
  );
}
