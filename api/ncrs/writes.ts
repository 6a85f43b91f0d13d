// Every change to an NCR, each in one transaction with its audit events and its e-mail: raise, edit
// (assign, lots, alarms, dispositions, approval, closure facts), step through the flow, actions,
// attachments. The router only parses and answers.
import { sql } from 'drizzle-orm';
import { drizzle } from 'drizzle-orm/node-postgres';
import { may } from '@shared/permissions';
import type { CreateNcrActionInput, CreateNcrInput, NcrTransitionInput, UpdateNcrActionInput, UpdateNcrInput } from '@shared/schemas/ncr-requests';
import type { LotDisposition, NcrStatus } from '@shared/schemas/ncrs';
import type { Role } from '@shared/schemas/roles';
import { plantDay } from '@shared/time';
import type { Database } from '@api/db/client';
import * as schema from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { arr } from '@api/db/sql';
import { conflict, fieldError, HttpError, notFound } from '@api/http/errors';
import { placeHold, releaseHold } from '@api/lots/holds';
import { putFile } from '@api/files/store';
import { queueNcrMail } from '@api/mail/ncr-mail';
import type { Executor, Tx } from '@api/spc/db';
import { checkTransition } from './flow';
import { takeNcrNumber } from './numbering';
import { loadNcrView } from './view';
import { attachmentType, sanitiseFileName } from './attachments';

/** Who makes the change. */
export interface Actor {
  id: number;
  name: string;
  role: Role;
}

type LotRow = { id: number; lot_number: string; product_id: number; plant_id: number };

/**
 * Lots by number, each once; 404 naming the first unknown one, under its field of the request
 * (`field`.N.lotNumber) when it was listed there, so a form shows it beside the lot.
 */
async function lotsByNumber(tx: Executor, numbers: string[], field: 'lots' | 'addLots', listed = numbers.length): Promise<LotRow[]> {
  const wanted = [...new Set(numbers)];
  if (!wanted.length) return [];
  const res = await tx.execute<LotRow>(sql`
    select l.id, l.lot_number, l.product_id, p.plant_id from lots l join products p on p.id = l.product_id where l.lot_number = any(${arr(wanted)}::text[])`);
  const found = new Map(res.rows.map((r) => [r.lot_number, r]));
  const missing = wanted.find((n) => !found.has(n));
  if (missing !== undefined) {
    const at = numbers.indexOf(missing);
    const message = `Lot ${missing} not found`;
    throw new HttpError(404, message, at < listed ? [{ path: `${field}.${at}.lotNumber`, message }] : undefined);
  }
  return wanted.map((n) => found.get(n)!);
}

type AlarmRow = { id: number; product_id: number; plant_id: number; lot_id: number; lot_number: string };

/** Alarms by id; 404 naming the first unknown one. */
async function alarmsById(tx: Executor, ids: number[]): Promise<AlarmRow[]> {
  const wanted = [...new Set(ids)];
  if (!wanted.length) return [];
  const res = await tx.execute<AlarmRow>(sql`
    select a.id, c.product_id, p.plant_id, a.lot_id, l.lot_number from alarms a join characteristics c on c.id = a.characteristic_id join products p on p.id = c.product_id
    join lots l on l.id = a.lot_id where a.id = any(${arr(wanted)}::int[])`);
  const found = new Map(res.rows.map((r) => [r.id, r]));
  const missing = wanted.find((id) => !found.has(id));
  if (missing !== undefined) throw notFound(`Alarm ${missing}`);
  return wanted.map((id) => found.get(id)!);
}

async function productById(tx: Executor, id: number): Promise<{ id: number; code: string; plant_id: number }> {
  const res = await tx.execute<{ id: number; code: string; plant_id: number }>(sql`select id, code, plant_id from products where id = ${id}`);
  if (!res.rows[0]) throw notFound(`Product ${id}`);
  return res.rows[0];
}

async function activeUser(tx: Executor, id: number, field: string): Promise<{ id: number; name: string }> {
  const res = await tx.execute<{ id: number; name: string }>(sql`select id, name from users where id = ${id} and active`);
  if (!res.rows[0]) throw fieldError(field, `No active user with id ${id}`);
  return res.rows[0];
}

type NcrLock = { id: number; number: string; title: string; status: NcrStatus; plant_id: number; product_id: number | null; assignee_id: number | null; time_zone: string };

/** The NCR's row, locked for the change; 404 when there is none. */
async function lockNcr(tx: Executor, id: number): Promise<NcrLock> {
  const res = await tx.execute<NcrLock>(sql`
    select n.id, n.number, n.title, n.status, n.plant_id, n.product_id, n.assignee_id, pt.time_zone from ncrs n join plants pt on pt.id = n.plant_id where n.id = ${id} for update of n`);
  if (!res.rows[0]) throw notFound(`NCR ${id}`);
  return res.rows[0];
}

const refuseClosed = (n: NcrLock) => {
  if (n.status === 'closed') throw conflict(`${n.number} is closed; reopen it (with a reason) before changing it`);
};

/** Adds lots to an NCR (those already on it are skipped) and, for containment, puts them on hold. */
async function addLots(tx: Tx, n: { id: number; number: string; title: string }, lots: LotRow[], quantities: Map<string, number | null>, hold: boolean, actor: Actor) {
  if (!lots.length) return { added: [] as string[], held: [] as string[] };
  const inserted = await tx.execute<{ lot_id: number }>(sql`
    insert into ncr_lots (ncr_id, lot_id, quantity_t)
    select ${n.id}, u.lot_id, u.quantity from unnest(${arr(lots.map((l) => l.id))}::int[], ${arr(lots.map((l) => quantities.get(l.lot_number) ?? null))}::float8[]) as u(lot_id, quantity)
    on conflict do nothing returning lot_id`);
  const added = lots.filter((l) => inserted.rows.some((r) => r.lot_id === l.id)).map((l) => l.lot_number);
  const held: string[] = [];
  if (hold) {
    for (const l of lots) {
      const holdId = await placeHold(tx, { lotId: l.id, lotNumber: l.lot_number, source: 'ncr', reason: `Contained under ${n.number}: ${n.title}`, actorId: actor.id, ncrId: n.id });
      if (holdId !== null) held.push(l.lot_number);
    }
  }
  return { added, held };
}

/** Raises an NCR: from alarms, from lots, or directly; its number is taken last, so a refused raise takes none. */
export async function raiseNcr(db: Database, input: CreateNcrInput, actor: Actor, publicUrl: string): Promise<number> {
  if (input.assigneeId != null && !may(actor.role, 'ncr.manage')) throw new HttpError(403, 'Only a quality manager or an administrator may assign an NCR');
  return db.transaction(async (tx) => {
    const alarms = await alarmsById(tx, input.alarmIds ?? []);
    const listed = input.lots ?? [];
    // An alarm's lot is concerned too, unless listed with its quantity already.
    const numbers = [...listed.map((l) => l.lotNumber), ...alarms.map((a) => a.lot_number)];
    const lots = await lotsByNumber(tx, numbers, 'lots', listed.length);
    const quantities = new Map(listed.map((l) => [l.lotNumber, l.quantityT ?? null]));
    const product = input.productId !== undefined ? await productById(tx, input.productId) : null;
    const productIds = [...new Set([...alarms.map((a) => a.product_id), ...lots.map((l) => l.product_id)])];
    const productId = product?.id ?? (productIds.length === 1 ? productIds[0] : null);
    const assignee = input.assigneeId != null ? await activeUser(tx, input.assigneeId, 'assigneeId') : null;
    const plantId = product?.plant_id ?? alarms[0]?.plant_id ?? lots[0]?.plant_id ?? null;
    const plant = await tx.execute<{ id: number; time_zone: string }>(
      plantId === null ? sql`select id, time_zone from plants order by id limit 1` : sql`select id, time_zone from plants where id = ${plantId}`,
    );
    if (!plant.rows[0]) throw conflict('There is no plant to raise the NCR at');
    const raisedFrom = alarms.length ? 'alarms' : lots.length ? 'lot' : 'direct';

    const number = await takeNcrNumber(tx, plant.rows[0].id, plant.rows[0].time_zone);
    const [row] = await tx
      .insert(schema.ncrs)
      .values({
        plantId: plant.rows[0].id,
        number: number.number,
        year: number.year,
        sequence: number.sequence,
        title: input.title,
        description: input.description,
        productId,
        severity: input.severity,
        raisedFrom,
        assigneeId: assignee?.id ?? null,
        createdBy: actor.id,
      })
      .returning({ id: schema.ncrs.id });
    const n = { id: row.id, number: number.number, title: input.title };
    if (alarms.length) await tx.insert(schema.ncrAlarms).values(alarms.map((a) => ({ ncrId: n.id, alarmId: a.id })));
    const { held } = await addLots(tx, n, lots, quantities, input.holdLots === true, actor);
    await recordAudit(tx, {
      actorId: actor.id,
      entity: 'ncr',
      action: 'raise',
      entityId: n.id,
      after: { number: n.number, title: n.title, severity: input.severity, raisedFrom, productId, lotNumbers: lots.map((l) => l.lot_number), alarmIds: alarms.map((a) => a.id), held },
    });
    if (assignee) await recordAudit(tx, { actorId: actor.id, entity: 'ncr', action: 'assign', entityId: n.id, after: { assigneeId: assignee.id, assigneeName: assignee.name } });
    await queueNcrMail(tx, { ncrId: n.id, occasion: 'raised', actorName: actor.name, publicUrl });
    return n.id;
  });
}

/** One lot's disposition: the hold follows (release and downgrade release it, rework keeps it, scrap releases it and the lot is rejected). */
async function disposeLot(tx: Tx, n: NcrLock, d: NonNullable<UpdateNcrInput['dispositions']>[number], actor: Actor): Promise<void> {
  const res = await tx.execute<{ lot_id: number; product_id: number; disposition: LotDisposition | null; held: boolean }>(sql`
    select nl.lot_id, l.product_id, nl.disposition, exists (select from lot_holds h where h.lot_id = l.id and h.released_at is null) as held
    from ncr_lots nl join lots l on l.id = nl.lot_id where nl.ncr_id = ${n.id} and l.lot_number = ${d.lotNumber} for update of nl`);
  const lot = res.rows[0];
  if (!lot) throw notFound(`Lot ${d.lotNumber} on ${n.number}`);
  if (lot.disposition) throw conflict(`Lot ${d.lotNumber} was already decided on ${n.number} (${lot.disposition}); a decision is not changed`);
  let downgrade: { id: number; code: string } | null = null;
  if (d.disposition === 'downgrade') {
    if (d.downgradeProductId === undefined) throw fieldError('dispositions.downgradeProductId', 'Choose the product the lot is downgraded to');
    downgrade = await productById(tx, d.downgradeProductId);
    if (downgrade.id === lot.product_id) throw fieldError('dispositions.downgradeProductId', 'Choose another product than the lot’s own');
  } else if (d.downgradeProductId !== undefined) {
    throw fieldError('dispositions.downgradeProductId', 'A product to downgrade to goes only with the downgrade disposition');
  }
  const reason = `${n.number}: ${d.disposition} — ${d.note}`;
  if (d.disposition === 'rework') {
    if (!lot.held) await placeHold(tx, { lotId: lot.lot_id, lotNumber: d.lotNumber, source: 'ncr', reason: `Held for rework under ${reason}`, actorId: actor.id, ncrId: n.id });
  } else if (lot.held) {
    await releaseHold(tx, { lotId: lot.lot_id, lotNumber: d.lotNumber, reason, actorId: actor.id, ncrId: n.id });
  }
  await tx.execute(sql`
    update ncr_lots set disposition = ${d.disposition}, downgrade_product_id = ${downgrade?.id ?? null}, disposition_note = ${d.note}, disposed_at = now(), disposed_by = ${actor.id}
    where ncr_id = ${n.id} and lot_id = ${lot.lot_id}`);
  const after = { ncrId: n.id, ncrNumber: n.number, lotNumber: d.lotNumber, disposition: d.disposition, downgradeProductId: downgrade?.id ?? null, downgradeProductCode: downgrade?.code ?? null };
  await recordAudit(tx, [
    { actorId: actor.id, entity: 'lot', action: 'disposition', entityId: d.lotNumber, after, reason: d.note },
    { actorId: actor.id, entity: 'ncr', action: 'disposition', entityId: n.id, after, reason: d.note },
  ]);
}

const fieldColumns = {
  title: 'title',
  description: 'description',
  severity: 'severity',
  productId: 'product_id',
  rootCauseCategory: 'root_cause_category',
  rootCauseAnalysis: 'root_cause_analysis',
  effectivenessCheck: 'effectiveness_check',
  effective: 'effective',
} as const;

/** PATCH: fields, assignee, lots and alarms, dispositions and approval, each audited as its own kind of change. */
export async function updateNcr(db: Database, id: number, input: UpdateNcrInput, actor: Actor, publicUrl: string): Promise<void> {
  await db.transaction(async (tx) => {
    const n = await lockNcr(tx, id);
    refuseClosed(n);
    const current = (await tx.execute<Record<string, unknown>>(sql`select * from ncrs where id = ${id}`)).rows[0];
    // updated_at moves only with a change the trail records: a PATCH that changes nothing writes nothing.
    let recorded = false;
    const before: Record<string, unknown> = {};
    const after: Record<string, unknown> = {};
    for (const [field, column] of Object.entries(fieldColumns) as [keyof typeof fieldColumns, string][]) {
      const value = input[field];
      if (value === undefined || value === current[column]) continue;
      if (field === 'productId' && value !== null) await productById(tx, value as number);
      before[field] = current[column];
      after[field] = value;
    }
    if (Object.keys(after).length) {
      const sets = Object.entries(after).map(([field, value]) => sql`${sql.identifier(fieldColumns[field as keyof typeof fieldColumns])} = ${value}`);
      await tx.execute(sql`update ncrs set ${sql.join(sets, sql`, `)} where id = ${id}`);
      await recordAudit(tx, { actorId: actor.id, entity: 'ncr', action: 'update', entityId: id, before, after });
      recorded = true;
    }
    if (input.assigneeId !== undefined && input.assigneeId !== n.assignee_id) {
      const assignee = input.assigneeId === null ? null : await activeUser(tx, input.assigneeId, 'assigneeId');
      await tx.execute(sql`update ncrs set assignee_id = ${assignee?.id ?? null} where id = ${id}`);
      await recordAudit(tx, { actorId: actor.id, entity: 'ncr', action: 'assign', entityId: id, before: { assigneeId: n.assignee_id }, after: { assigneeId: assignee?.id ?? null, assigneeName: assignee?.name ?? null } });
      await queueNcrMail(tx, { ncrId: id, occasion: 'assigned', actorName: actor.name, publicUrl });
      recorded = true;
    }
    if (input.addLots?.length) {
      const lots = await lotsByNumber(tx, input.addLots.map((l) => l.lotNumber), 'addLots');
      const { added, held } = await addLots(tx, n, lots, new Map(input.addLots.map((l) => [l.lotNumber, l.quantityT ?? null])), input.holdLots === true, actor);
      if (added.length || held.length) {
        await recordAudit(tx, { actorId: actor.id, entity: 'ncr', action: 'add lots', entityId: id, after: { lotNumbers: added, held } });
        recorded = true;
      }
    }
    if (input.addAlarmIds?.length) {
      const alarms = await alarmsById(tx, input.addAlarmIds);
      const linked = await tx.execute<{ alarm_id: number }>(sql`
        insert into ncr_alarms (ncr_id, alarm_id) select ${id}, unnest(${arr(alarms.map((a) => a.id))}::int[]) on conflict do nothing returning alarm_id`);
      if (linked.rows.length) {
        await recordAudit(tx, { actorId: actor.id, entity: 'ncr', action: 'link alarms', entityId: id, after: { alarmIds: linked.rows.map((r) => r.alarm_id) } });
        recorded = true;
      }
    }
    for (const d of input.dispositions ?? []) {
      await disposeLot(tx, n, d, actor);
      recorded = true;
    }
    if (input.approve) {
      await tx.execute(sql`update ncrs set approved_at = now(), approved_by = ${actor.id}, approval_note = ${input.approve.note} where id = ${id}`);
      await recordAudit(tx, { actorId: actor.id, entity: 'ncr', action: 'approve', entityId: id, after: { approvalNote: input.approve.note } });
      recorded = true;
    }
    if (recorded) await tx.execute(sql`update ncrs set updated_at = now() where id = ${id}`);
  });
}

/**
 * A step of the flow. Closing needs everything closingBlockers asks for; reopening (and going back to
 * investigating) needs a reason; reopening clears the approval and the effectiveness check, which the
 * audit trail keeps, so the next closing is decided afresh.
 */
export async function transitionNcr(db: Database, id: number, input: NcrTransitionInput, actor: Actor, publicUrl: string): Promise<void> {
  await db.transaction(async (tx) => {
    const n = await lockNcr(tx, id);
    const view = await loadNcrView(tx, id, publicUrl);
    checkTransition(n.status, input.to, input.reason, view!.closingBlockers);
    const reopen = n.status === 'closed' && input.to === 'open';
    await tx.execute(sql`
      update ncrs set status = ${input.to}, updated_at = now(),
        closed_at = case when ${input.to} = 'closed' then now() else null end,
        closed_by = case when ${input.to} = 'closed' then ${actor.id}::int else null end
      where id = ${id}`);
    if (reopen) await tx.execute(sql`update ncrs set approved_at = null, approved_by = null, approval_note = null, effectiveness_check = null, effective = null where id = ${id}`);
    await recordAudit(tx, {
      actorId: actor.id,
      entity: 'ncr',
      action: 'transition',
      entityId: id,
      before: reopen ? { status: n.status, approvalNote: view!.approvalNote, effectivenessCheck: view!.effectivenessCheck, effective: view!.effective } : { status: n.status },
      after: { status: input.to },
      reason: input.reason ?? null,
    });
    if (input.to === 'closed' || reopen) await queueNcrMail(tx, { ncrId: id, occasion: reopen ? 'reopened' : 'closed', actorName: actor.name, reason: input.reason, publicUrl });
  });
}

/** A corrective or preventive action, owned by an active user. */
export async function addAction(db: Database, id: number, input: CreateNcrActionInput, actor: Actor): Promise<number> {
  return db.transaction(async (tx) => {
    const n = await lockNcr(tx, id);
    refuseClosed(n);
    const owner = await activeUser(tx, input.ownerId, 'ownerId');
    const [row] = await tx
      .insert(schema.ncrActions)
      .values({ ncrId: id, kind: input.kind, description: input.description, ownerId: owner.id, dueDate: input.dueDate, createdBy: actor.id })
      .returning({ id: schema.ncrActions.id });
    await recordAudit(tx, {
      actorId: actor.id,
      entity: 'ncr',
      action: 'add action',
      entityId: id,
      after: { actionId: row.id, kind: input.kind, description: input.description, ownerId: owner.id, ownerName: owner.name, dueDate: input.dueDate },
    });
    await tx.execute(sql`update ncrs set updated_at = now() where id = ${id}`);
    return row.id;
  });
}

const actionColumns = { description: 'description', ownerId: 'owner_id', dueDate: 'due_date', doneDate: 'done_date', evidence: 'evidence' } as const;

/** Owners record the done date and evidence of their own action; managers may change anything of any action. */
export async function updateAction(db: Database, id: number, actionId: number, input: UpdateNcrActionInput, actor: Actor, now: Date = new Date()): Promise<void> {
  await db.transaction(async (tx) => {
    const n = await lockNcr(tx, id);
    refuseClosed(n);
    const res = await tx.execute<Record<string, unknown> & { owner_id: number }>(sql`
      select description, owner_id, due_date::text as due_date, done_date::text as done_date, evidence from ncr_actions where id = ${actionId} and ncr_id = ${id} for update`);
    const current = res.rows[0];
    if (!current) throw notFound(`Action ${actionId} of ${n.number}`);
    if (!may(actor.role, 'ncr.manage')) {
      if (current.owner_id !== actor.id) throw new HttpError(403, 'Only the action’s owner or a quality manager may record its evidence and done date');
      if (input.description !== undefined || input.ownerId !== undefined || input.dueDate !== undefined)
        throw new HttpError(403, 'Only a quality manager may change what an action is, its owner or its due date');
    }
    if (input.ownerId !== undefined) await activeUser(tx, input.ownerId, 'ownerId');
    if (input.doneDate && input.doneDate > plantDay(now, n.time_zone)) throw fieldError('doneDate', 'The done date cannot be after today at the plant');
    const before: Record<string, unknown> = {};
    const after: Record<string, unknown> = {};
    for (const [field, column] of Object.entries(actionColumns) as [keyof typeof actionColumns, string][]) {
      const value = input[field];
      if (value === undefined || value === current[column]) continue;
      before[field] = current[column];
      after[field] = value;
    }
    if (!Object.keys(after).length) return;
    const sets = Object.entries(after).map(([field, value]) => sql`${sql.identifier(actionColumns[field as keyof typeof actionColumns])} = ${value}`);
    await tx.execute(sql`update ncr_actions set ${sql.join(sets, sql`, `)}, updated_at = now() where id = ${actionId}`);
    await recordAudit(tx, { actorId: actor.id, entity: 'ncr', action: 'update action', entityId: id, before: { actionId, ...before }, after: { actionId, ...after } });
    await tx.execute(sql`update ncrs set updated_at = now() where id = ${id}`);
  });
}

/** A file received for an NCR. */
export interface IncomingFile {
  originalName: string;
  bytes: Buffer;
}

/**
 * Stores files on an NCR: each checked by its bytes first (415), then kept through the stored-file
 * service on one connection, so bytes, attachment rows and audit events commit together.
 */
export async function attachFiles(db: Database, id: number, files: IncomingFile[], note: string | undefined, actor: Actor): Promise<number[]> {
  const checked = files.map((f) => {
    const fileName = sanitiseFileName(f.originalName);
    return { fileName, bytes: f.bytes, type: attachmentType(f.bytes, fileName) };
  });
  const client = await db.$client.connect();
  try {
    await client.query('begin');
    const tx = drizzle(client, { schema });
    const n = await lockNcr(tx as unknown as Executor, id);
    refuseClosed(n);
    const ids: number[] = [];
    for (const f of checked) {
      const stored = await putFile(client, { fileName: f.fileName, bytes: f.bytes, createdBy: actor.id, accept: [f.type] });
      const [row] = await tx.insert(schema.ncrAttachments).values({ ncrId: id, fileId: stored.id, note: note ?? null, createdBy: actor.id }).returning({ id: schema.ncrAttachments.id });
      await recordAudit(tx, {
        actorId: actor.id,
        entity: 'ncr',
        action: 'attach file',
        entityId: id,
        after: { attachmentId: row.id, fileId: stored.id, fileName: f.fileName, contentType: stored.contentType, sizeBytes: stored.sizeBytes, sha256: stored.sha256 },
        reason: note ?? null,
      });
      ids.push(row.id);
    }
    await client.query('update ncrs set updated_at = now() where id = $1', [id]);
    await client.query('commit');
    return ids;
  } catch (err) {
    await client.query('rollback').catch(() => undefined);
    throw err;
  } finally {
    client.release();
  }
}
