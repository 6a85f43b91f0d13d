// The demo plant's quality records, told after its SPC history and the quality manager's alarm
// decisions (decisions.ts): two closed NCRs on the planted causes a manager would have written up
// (the new sand source, the miscalibrated press), one open NCR on the recent lot out of specification
// with an action overdue, its two lots on hold waiting for their disposition, and an open investigation
// grouping the alarms one raw-material delivery raised. Every record is written as the app writes it
// (placeHold / releaseHold, recordAudit) and dated when the story has it happen (story-time.ts), by the
// demo quality manager or technician, never at the moment the seed runs. Holds the seed's runs placed on
// other lots out of specification are released the morning their alarms were closed, with the reason.
import { sql } from 'drizzle-orm';
import { plantDay } from '@shared/time';
import type { CauseCategory } from '@shared/schemas/causes';
import type { LotDisposition, NcrActionKind, NcrSeverity, NcrStatus } from '@shared/schemas/ncrs';
import { OUT_OF_SPEC } from '@api/spc/alarms';
import { placeHold, releaseHold } from '@api/lots/holds';
import type { Tx } from '@api/spc/db';
import type { Database } from '../client';
import { recordAudit, type AuditEntry } from '../audit';
import { causeNotes, COMMON_CAUSE_NOTE, COMMON_CAUSE_SPREAD_NOTE, OPEN_DAYS, PRESS_EXCLUSION_REASON, RETEST_PASSED_NOTE, SAND_REVISION_REASON } from './decisions';
import { nextWorkingMorning, plantedCausesFor, type ScenarioWindow } from './scenario';
import { hash32 } from './scenario/random';
import { decidedAt } from './story-time';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;

/** The category of cause each planted cause's alarms were closed with (shared/schemas/causes.ts). */
export const causeCategoryOf: Record<string, CauseCategory> = {
  'cold-snap': 'environment',
  'defoamer-drift': 'material',
  'sand-source': 'material',
  'press-miscalibration': 'measurement',
  'oos-hvlf-flow': 'method',
  'oos-hvl25-rc28': 'material',
  'oos-hvfx-slip': 'material',
  'oos-hvfx-adh28': 'material',
  'oos-hvr3-dens': 'machine',
};

/** Why the hold of a lot out of specification was released, by the note its alarm was closed with. */
const releaseReasonOf: Record<string, string> = {
  'cold-snap': 'Released as is: 7- and 28-day strengths of the lot normal; the low 1-day strength came from the cold weather',
  'defoamer-drift': 'Released as is: customer informed of the air content; new defoamer batch opened',
  'oos-hvlf-flow': 'Reworked; retest of the reworked lot inside specification, released',
  'oos-hvl25-rc28': 'Customer informed of the low 28-day strength; released as is',
  'oos-hvfx-slip': 'Retest confirmed the slip: lot scrapped and taken off stock; hold closed',
  'oos-hvfx-adh28': 'Customer informed of the low adhesion; released as is',
  'oos-hvr3-dens': 'Retest confirmed the low density: lot downgraded and released for sale as the lower grade',
};
export const RETESTED_RELEASE_REASON = 'Retest of the retained sample within specification; released';

/** What the investigation's delivery was, by product: the raw material that moves several of its properties at once (common practice). */
const deliveryOf: Record<string, string> = { HVL25: 'cement', HVLF: 'cement', HVFX: 'cellulose ether', HVR3: 'cement' };

/** Tonnes of a lot: an invented, fixed figure per lot number (16–28 t, a half shift of a dry-mix line). */
export const lotTonnes = (lotNumber: string) => 16 + (hash32(`${lotNumber}/t`) % 25) * 0.5;

export interface QualityStoryOptions extends ScenarioWindow {
  managerId: number;
  technicianId: number;
}

/** What the story made, for the report and the tests. */
export interface QualityStory {
  ncrs: { key: 'sand-source' | 'press-miscalibration' | 'open-density'; id: number; number: string; status: NcrStatus }[];
  /** The lots left on hold, waiting for their disposition. */
  heldLots: string[];
  groupId: number | null;
}

type LotRow = { id: number; lot_number: string; product_id: number; produced_ms: number };

/** The working morning `n` working days after `ms`'s plant day (n ≥ 1). */
function workingMorningsAfter(ms: number, n: number): number {
  let at = ms;
  for (let i = 0; i < n; i++) at = nextWorkingMorning(at);
  return at;
}

/** Records the story; see the top of this file. Runs in one transaction. */
export async function recordQualityStory(db: Database, opts: QualityStoryOptions): Promise<QualityStory> {
  return db.transaction((tx) => tell(tx, opts));
}

async function tell(tx: Tx, opts: QualityStoryOptions): Promise<QualityStory> {
  const { managerId: manager, technicianId: technician } = opts;
  const endMs = opts.endDate.getTime();
  const causes = plantedCausesFor(opts);
  const [plant] = (await tx.execute<{ id: number; time_zone: string }>(sql`select id, time_zone from plants order by id limit 1`)).rows;
  const day = (ms: number) => plantDay(new Date(ms), plant.time_zone);
  const audit = (ms: number, entries: AuditEntry | AuditEntry[]) => decidedAt(tx, new Date(ms), () => recordAudit(tx, entries));
  const lotsWhere = async (where: ReturnType<typeof sql>) =>
    (
      await tx.execute<LotRow>(sql`
        select l.id, l.lot_number, l.product_id, (extract(epoch from l.produced_at) * 1000)::float8 as produced_ms from lots l where ${where} order by l.produced_at, l.lot_number`)
    ).rows.map((r) => ({ ...r, produced_ms: Number(r.produced_ms) }));
  const productId = async (code: string) => (await tx.execute<{ id: number }>(sql`select id from products where code = ${code}`)).rows[0].id;

  // Every alarm a person closed carries how: an assignable cause with its category where the story knows one.
  for (const [id, category] of Object.entries(causeCategoryOf)) await setOutcome(tx, causeNotes[id], 'assignable-cause', category);
  for (const note of [COMMON_CAUSE_NOTE, COMMON_CAUSE_SPREAD_NOTE, RETEST_PASSED_NOTE]) await setOutcome(tx, note, 'no-cause', null);
  await dateAutomaticHolds(tx, endMs);

  // The NCRs are numbered in the order they were raised, per year of the raising day at the plant.
  const raised: { at: number; write: (n: { number: string; year: number; sequence: number }) => Promise<QualityStory['ncrs'][number]> }[] = [];
  const numbering = new Map<number, number>();
  const story: QualityStory = { ncrs: [], heldLots: [], groupId: null };

  /** One NCR from raising to its last step; the steps are given in time order. */
  const ncrOf = (n: {
    raisedAt: number; title: string; description: string; productId: number | null; severity: NcrSeverity; raisedFrom: 'alarms' | 'lot' | 'direct'; alarmIds: number[];
  }) => ({
    async raise(num: { number: string; year: number; sequence: number }): Promise<number> {
      const [row] = (
        await tx.execute<{ id: number }>(sql`
          insert into ncrs (plant_id, number, year, sequence, title, description, product_id, severity, status, raised_from, assignee_id, created_by, created_at, updated_at)
          values (${plant.id}, ${num.number}, ${num.year}, ${num.sequence}, ${n.title}, ${n.description}, ${n.productId}, ${n.severity}, 'open', ${n.raisedFrom}, ${manager}, ${manager}, ${new Date(n.raisedAt)}, ${new Date(n.raisedAt)})
          returning id`)
      ).rows;
      await audit(n.raisedAt, {
        actorId: manager, entity: 'ncr', action: 'raise', entityId: row.id,
        after: { number: num.number, title: n.title, severity: n.severity, status: 'open', raisedFrom: n.raisedFrom, productId: n.productId, assigneeId: manager },
      });
      if (n.alarmIds.length) {
        await tx.execute(sql`insert into ncr_alarms (ncr_id, alarm_id) select ${row.id}, unnest(${sql.param(n.alarmIds)}::int[])`);
        await audit(n.raisedAt, { actorId: manager, entity: 'ncr', action: 'link alarms', entityId: row.id, after: { alarmIds: n.alarmIds } });
      }
      return row.id;
    },
  });

  const touch = (ncrId: number, at: number) => tx.execute(sql`update ncrs set updated_at = greatest(updated_at, ${new Date(at)}) where id = ${ncrId}`);
  const transition = async (ncrId: number, at: number, from: NcrStatus, to: NcrStatus, actor = manager) => {
    await tx.execute(sql`update ncrs set status = ${to} where id = ${ncrId}`);
    await touch(ncrId, at);
    await audit(at, { actorId: actor, entity: 'ncr', action: 'transition', entityId: ncrId, before: { status: from }, after: { status: to } });
  };
  const addLots = async (ncrId: number, at: number, lots: LotRow[], hold: { reason: string; which: (l: LotRow) => boolean } | null) => {
    for (const l of lots) await tx.execute(sql`insert into ncr_lots (ncr_id, lot_id, quantity_t) values (${ncrId}, ${l.id}, ${lotTonnes(l.lot_number)})`);
    await audit(at, { actorId: manager, entity: 'ncr', action: 'add lots', entityId: ncrId, after: { lots: lots.map((l) => ({ lotNumber: l.lot_number, quantityT: lotTonnes(l.lot_number) })) } });
    if (!hold) return;
    for (const l of lots.filter(hold.which)) {
      const id = await decidedAt(tx, new Date(at), () => placeHold(tx, { lotId: l.id, lotNumber: l.lot_number, source: 'ncr', reason: hold.reason, actorId: manager, ncrId }));
      if (id !== null) await tx.execute(sql`update lot_holds set placed_at = ${new Date(at)} where id = ${id}`);
    }
    await touch(ncrId, at);
  };
  const rootCause = async (ncrId: number, at: number, category: CauseCategory, analysis: string) => {
    await tx.execute(sql`update ncrs set root_cause_category = ${category}, root_cause_analysis = ${analysis} where id = ${ncrId}`);
    await touch(ncrId, at);
    await audit(at, { actorId: manager, entity: 'ncr', action: 'update', entityId: ncrId, after: { rootCauseCategory: category, rootCauseAnalysis: analysis } });
  };
  const addAction = async (ncrId: number, at: number, a: { kind: NcrActionKind; description: string; owner: number; dueDate: string }) => {
    const [row] = (
      await tx.execute<{ id: number }>(sql`
        insert into ncr_actions (ncr_id, kind, description, owner_id, due_date, created_by, created_at, updated_at)
        values (${ncrId}, ${a.kind}, ${a.description}, ${a.owner}, ${a.dueDate}, ${manager}, ${new Date(at)}, ${new Date(at)}) returning id`)
    ).rows;
    await touch(ncrId, at);
    await audit(at, { actorId: manager, entity: 'ncr', action: 'add action', entityId: ncrId, after: { actionId: row.id, kind: a.kind, description: a.description, ownerId: a.owner, dueDate: a.dueDate } });
    return row.id;
  };
  const actionDone = async (ncrId: number, actionId: number, at: number, by: number, evidence: string) => {
    const doneDate = day(at);
    await tx.execute(sql`update ncr_actions set done_date = ${doneDate}, evidence = ${evidence}, updated_at = ${new Date(at)} where id = ${actionId}`);
    await touch(ncrId, at);
    await audit(at, { actorId: by, entity: 'ncr', action: 'update action', entityId: ncrId, before: { actionId, doneDate: null, evidence: null }, after: { actionId, doneDate, evidence } });
  };
  const dispose = async (ncrId: number, at: number, l: LotRow, disposition: LotDisposition, note: string, release: string | null) => {
    await tx.execute(sql`
      update ncr_lots set disposition = ${disposition}, disposition_note = ${note}, disposed_at = ${new Date(at)}, disposed_by = ${manager}
      where ncr_id = ${ncrId} and lot_id = ${l.id}`);
    await touch(ncrId, at);
    await audit(at, { actorId: manager, entity: 'ncr', action: 'disposition', entityId: ncrId, after: { lotNumber: l.lot_number, disposition, note } });
    if (release) await releaseAt(tx, at, { lotId: l.id, lotNumber: l.lot_number, reason: release, actorId: manager, ncrId });
  };
  const approveAndClose = async (ncrId: number, approvedAt: number, approvalNote: string, closedAt: number, check: string) => {
    await tx.execute(sql`update ncrs set approved_at = ${new Date(approvedAt)}, approved_by = ${manager}, approval_note = ${approvalNote} where id = ${ncrId}`);
    await audit(approvedAt, { actorId: manager, entity: 'ncr', action: 'approve', entityId: ncrId, after: { approvedBy: manager }, reason: approvalNote });
    await tx.execute(sql`update ncrs set effectiveness_check = ${check}, effective = true, closed_at = ${new Date(closedAt)}, closed_by = ${manager} where id = ${ncrId}`);
    await audit(closedAt, { actorId: manager, entity: 'ncr', action: 'update', entityId: ncrId, after: { effectivenessCheck: check, effective: true } });
    await transition(ncrId, closedAt, 'actions-pending', 'closed');
  };

  // 1. The new sand source: the first lots made with it contained, the cause found, actions done, closed.
  const sand = causes.find((c) => c.id === 'sand-source');
  const sandAlarms = sand
    ? (
        await tx.execute<{ id: number; lot_id: number; tested_ms: number }>(sql`
          select a.id, a.lot_id, (select (extract(epoch from max(m.tested_at)) * 1000)::float8 from measurements m where m.characteristic_id = a.characteristic_id and m.lot_id = a.lot_id and m.voided_at is null) as tested_ms
          from alarms a where a.close_note = ${causeNotes['sand-source']} order by a.id`)
      ).rows.map((r) => ({ ...r, tested_ms: Number(r.tested_ms) }))
    : [];
  if (sand && sandAlarms.length) {
    const sandFrom = Date.parse(sand.start);
    const hvl25 = await productId('HVL25');
    const firstSeen = Math.min(...sandAlarms.map((a) => a.tested_ms));
    const raisedAt = nextWorkingMorning(firstSeen);
    // The decisions' limit revision after the new level's first four weeks: the alarms were closed then.
    const revisedMs = (await tx.execute<{ ms: number | null }>(sql`
      select (extract(epoch from max(created_at)) * 1000)::float8 as ms from control_limit_revisions where reason = ${SAND_REVISION_REASON}`)).rows[0].ms;
    const limitsRevised = revisedMs === null ? workingMorningsAfter(raisedAt, 20) : Number(revisedMs);
    const lots = (await lotsWhere(sql`l.product_id = ${hvl25} and l.produced_at >= ${new Date(sandFrom)} and l.produced_at < ${new Date(raisedAt)}`)).slice(0, 10);
    const lotIds = new Set(lots.map((l) => l.id));
    const alarmIds = sandAlarms.filter((a) => lotIds.has(a.lot_id)).map((a) => a.id);
    const ncr = ncrOf({
      raisedAt, raisedFrom: 'alarms', productId: hvl25, severity: 'major', alarmIds,
      title: 'HV Level 25: flow dropped after the change of sand source',
      description:
        'Flow and flow after 30 min of HV Level 25 fell to a lower level from the first lots made with the quartz sand 0–0.5 mm of the new quarry, ' +
        'below the lower control limit on most lots, though still inside specification. ' +
        'Lots made since the change held until the cause is known.',
    });
    raised.push({
      at: raisedAt,
      write: async (num) => {
        const id = await ncr.raise(num);
        await transition(id, raisedAt + HOUR, 'open', 'investigating');
        await addLots(id, raisedAt + HOUR, lots, { reason: 'Containment: made with the new sand source, flow below the usual level', which: () => true });
        const found = workingMorningsAfter(raisedAt, 1) + 4 * HOUR;
        await rootCause(id, found, 'material',
          'Sieve analysis (EN 933-1) of the retained sand: the new quarry\'s 0–0.5 mm sand carries more fines below 0.063 mm than the former source. ' +
          'More fines raise the water demand, so at the fixed water dose the flow is about 5 mm lower. Binder, additives, dosing and the test set-up checked: unchanged.');
        const fines = await addAction(id, found + HOUR, { kind: 'corrective', owner: manager, dueDate: day(found + 14 * DAY), description: 'Agree a limit on fines (passing 0.063 mm) for the new sand in its purchase specification and check it on every delivery' });
        const limits = await addAction(id, found + HOUR, { kind: 'corrective', owner: manager, dueDate: day(Math.max(limitsRevised, found + DAY)), description: 'Recalculate the flow control limits of HV Level 25 from the new level once four weeks of production are tested' });
        const change = await addAction(id, found + HOUR, { kind: 'preventive', owner: manager, dueDate: day(found + 21 * DAY), description: 'Change control: a new raw-material source needs a lab trial mix and the quality manager\'s approval before it goes into production' });
        const sieve = await addAction(id, found + HOUR, { kind: 'preventive', owner: technician, dueDate: day(found + 7 * DAY), description: 'Sieve the first delivery of any new sand source before it is used and file the result with the supplier\'s certificate' });
        await transition(id, found + 2 * HOUR, 'investigating', 'actions-pending');
        // The retained samples retested the next morning: inside specification, the stiffest lot reworked.
        const retest = workingMorningsAfter(found, 1);
        const lowest = await lowestFlowLot(tx, lots);
        for (const l of lots) {
          if (l.id === lowest) await dispose(id, retest, l, 'rework', 'Lowest flow of the contained lots: re-mixed with a small added dose of superplasticizer, then retested', null);
          else await dispose(id, retest, l, 'release', 'Retest of the retained sample inside specification; released as is', 'Released under the NCR: retest inside specification');
        }
        const reworked = lots.find((l) => l.id === lowest);
        if (reworked) await releaseAt(tx, workingMorningsAfter(retest, 2), { lotId: reworked.id, lotNumber: reworked.lot_number, reason: 'Reworked; retest of the reworked lot inside specification and at the usual flow, released', actorId: manager, ncrId: id });
        await actionDone(id, sieve, workingMorningsAfter(found, 3) + 3 * HOUR, technician, 'Sieve analysis of the second delivery filed with the quarry\'s certificate; fines as on the first delivery');
        await actionDone(id, fines, workingMorningsAfter(found, 8), manager, 'Purchase specification of the 0–0.5 mm sand revised with a fines limit; acknowledged by the quarry; goods-in checklist updated');
        await actionDone(id, change, workingMorningsAfter(found, 12), manager, 'Raw-material change procedure revised; shift leaders briefed, attendance list filed');
        await actionDone(id, limits, limitsRevised + HOUR, manager, 'Revision 2 of the flow limits of HV Level 25 (flow and flow after 30 min) frozen from the first four weeks on the new sand');
        const approved = limitsRevised + 2 * HOUR;
        const closed = workingMorningsAfter(limitsRevised, 5);
        await approveAndClose(id, approved, 'Root cause and actions reviewed; dispositions agreed', closed,
          'Five weeks of lots on the new sand: flow stable at the new level, no point beyond the revised limits, every lot inside specification; second and third deliveries met the fines limit. Effective.');
        return { key: 'sand-source', id, number: num.number, status: 'closed' };
      },
    });
  }

  // 2. The miscalibrated press: the product was fine, the measurement wrong; the lots released as is.
  const press = causes.find((c) => c.id === 'press-miscalibration');
  const pressLots = press ? await lotsWhere(sql`l.id in (select lot_id from point_exclusions where reason = ${PRESS_EXCLUSION_REASON})`) : [];
  if (press && pressLots.length) {
    const raisedAt = nextWorkingMorning(Date.parse(press.end!));
    const lots = pressLots;
    const alarmIds = (await tx.execute<{ id: number }>(sql`select id from alarms where close_note = ${causeNotes['press-miscalibration']} order by id`)).rows.map((r) => r.id);
    const ncr = ncrOf({
      raisedAt, raisedFrom: 'alarms', productId: null, severity: 'minor', alarmIds,
      title: 'Compressive strengths read high on the testing press during one shift',
      description:
        'The compressive sets tested on one early shift came out well above their usual level on every product and age tested, while the flexural strengths of the same prisms were normal. ' +
        'The load cell of the testing press was found reading high and recalibrated at the end of the shift. Lots still in stock held until their results are judged.',
    });
    raised.push({
      at: raisedAt,
      write: async (num) => {
        const id = await ncr.raise(num);
        await transition(id, raisedAt + HOUR, 'open', 'investigating');
        // Only the lots still in stock can be held: the older ones of the 7- and 28-day sets have shipped.
        await addLots(id, raisedAt + HOUR, lots, { reason: 'Containment: compressive result read on the miscalibrated press', which: (l) => raisedAt - l.produced_ms < 10 * DAY });
        const found = raisedAt + 4 * HOUR;
        await rootCause(id, found, 'measurement',
          'The load cell of the compression press had drifted and read about 18 % high; between its yearly calibrations nothing checked it against a reference. ' +
          'The sets tested on that shift are measurement errors, excluded from the charts; the product was not affected (flexural strengths of the same prisms and the other ages at their usual level).');
        const verify = await addAction(id, found + HOUR, { kind: 'corrective', owner: technician, dueDate: day(raisedAt + 2 * DAY), description: 'Verify the recalibrated press with the calibrated force-proving device over its working range' });
        const daily = await addAction(id, found + HOUR, { kind: 'preventive', owner: technician, dueDate: day(raisedAt + 7 * DAY), description: 'Check the press with the reference before the first test of every shift and record it in the press log; yearly external calibration on the lab schedule' });
        await transition(id, found + 2 * HOUR, 'investigating', 'actions-pending');
        for (const l of lots) {
          await dispose(id, found + 3 * HOUR, l, 'release', 'Product not affected: the reading was wrong, not the strength; released as is',
            raisedAt - l.produced_ms < 10 * DAY ? 'Released under the NCR: measurement error, product not affected' : null);
        }
        await actionDone(id, verify, workingMorningsAfter(raisedAt, 1) + 2 * HOUR, technician, 'Verification with the proving device at four loads across the range: all readings within the tolerance of the press\'s class; certificate filed');
        await actionDone(id, daily, workingMorningsAfter(raisedAt, 4), technician, 'Press log sheet with the daily reference check in use on all shifts; first week complete');
        const approved = workingMorningsAfter(raisedAt, 5);
        const closed = workingMorningsAfter(raisedAt, 10);
        await approveAndClose(id, approved, 'Measurement error confirmed; no product affected', closed,
          'Two weeks after the recalibration: daily reference checks all within tolerance, compressive strengths of every product at their usual level, no further exclusions needed. Effective.');
        return { key: 'press-miscalibration', id, number: num.number, status: 'closed' };
      },
    });
  }

  // 3. The recent lot out of specification: open, its lot and the other lot of its shift on hold waiting for the 28-day strengths.
  const dens = causes.find((c) => c.id === 'oos-hvl25-dens');
  if (dens) {
    const [lot] = await lotsWhere(sql`l.lot_number = ${dens.lot!}`);
    const shiftPrefix = dens.lot!.slice(0, -1);
    const [sister] = (await lotsWhere(sql`l.lot_number like ${`${shiftPrefix}%`} and l.id <> ${lot.id}`)).slice(0, 1);
    const alarm = (
      await tx.execute<{ id: number; tested_ms: number }>(sql`
        select a.id, (select (extract(epoch from max(m.tested_at)) * 1000)::float8 from measurements m where m.characteristic_id = a.characteristic_id and m.lot_id = a.lot_id and m.voided_at is null) as tested_ms
        from alarms a join characteristics c on c.id = a.characteristic_id where a.lot_id = ${lot.id} and c.code = 'HVL25-DENS' and a.rule = ${OUT_OF_SPEC}`)
    ).rows[0];
    const raisedAt = nextWorkingMorning(Number(alarm.tested_ms));
    const lots = [lot, ...(sister ? [sister] : [])];
    const ncr = ncrOf({
      raisedAt, raisedFrom: 'alarms', productId: lot.product_id, severity: 'major', alarmIds: [alarm.id],
      title: 'HV Level 25: fresh density above the upper limit',
      description:
        `Fresh bulk density of lot ${lot.lot_number} above the upper specification limit on both readings; flow and air content of the lot normal. ` +
        `Lot held, and the other lot of the same shift${sister ? ` (${sister.lot_number})` : ''} held as a precaution until the cause is known and the 28-day strengths are in.`,
    });
    raised.push({
      at: raisedAt,
      write: async (num) => {
        const id = await ncr.raise(num);
        await transition(id, raisedAt + HOUR, 'open', 'investigating');
        await addLots(id, raisedAt + HOUR, lots, { reason: 'Containment: fresh density out of specification, waiting for the disposition', which: () => true });
        const due28 = day(lot.produced_ms + 29 * DAY);
        await addAction(id, raisedAt + 2 * HOUR, {
          kind: 'corrective', owner: technician, dueDate: day(endMs - 3 * DAY),
          description: 'Check the sand and filler weigh hoppers of Line 1 against test weights and compare the night shift\'s batch records with the recipe',
        });
        await addAction(id, raisedAt + 2 * HOUR, {
          kind: 'corrective', owner: manager, dueDate: due28 > day(endMs) ? due28 : day(endMs + 5 * DAY),
          description: 'Decide the disposition of both lots once their 28-day compressive and flexural strengths are in',
        });
        story.heldLots.push(...lots.map((l) => l.lot_number));
        return { key: 'open-density', id, number: num.number, status: 'investigating' };
      },
    });
  }

  raised.sort((a, b) => a.at - b.at);
  for (const r of raised) {
    const year = Number(day(r.at).slice(0, 4));
    const sequence = (numbering.get(year) ?? 0) + 1;
    numbering.set(year, sequence);
    story.ncrs.push(await r.write({ number: `NCR-${year}-${String(sequence).padStart(4, '0')}`, year, sequence }));
  }
  for (const [year, last] of numbering) {
    await tx.execute(sql`
      insert into ncr_counters (plant_id, year, last_number) values (${plant.id}, ${year}, ${last})
      on conflict (plant_id, year) do update set last_number = greatest(ncr_counters.last_number, excluded.last_number)`);
  }

  // Only the open NCR's lots stay on hold; the other holds were released when the manager closed their lots' alarms.
  await releaseOtherHolds(tx, { endMs, managerId: manager, keep: story.heldLots });
  story.groupId = await groupInvestigation(tx, { endMs, manager, technician, skipLots: story.heldLots });
  return story;
}

/** Sets how the manager's closed alarms were closed, where not yet said, and says it in their closing audit events too. */
async function setOutcome(tx: Tx, note: string | undefined, outcome: 'assignable-cause' | 'no-cause', category: CauseCategory | null): Promise<void> {
  if (!note) return;
  const ids = (
    await tx.execute<{ id: number }>(sql`
      update alarms set outcome = ${outcome}, cause_category = ${category}
      where close_note = ${note} and resolution = 'by-user' and outcome is null returning id`)
  ).rows.map((r) => String(r.id));
  if (!ids.length) return;
  await tx.execute(sql`
    update audit_events set after = coalesce(after, '{}'::jsonb) || jsonb_build_object('outcome', ${outcome}::text, 'causeCategory', ${category}::text)
    where entity = 'alarm' and action = 'close' and entity_id = any(${sql.param(ids)}::text[])`);
}

/**
 * The holds the seed's SPC runs placed by themselves (a result out of specification), settled as the
 * story has them: each dated at its alarm's detection and released as in releaseOtherHolds, but the
 * kept lots'. What the story does first and last; exported for the test that stands in for those holds.
 */
export async function settleHolds(tx: Tx, o: { endMs: number; managerId: number; keep: string[] }): Promise<void> {
  await dateAutomaticHolds(tx, o.endMs);
  await releaseOtherHolds(tx, o);
}

/**
 * A hold the system placed when an alarm was raised is dated at the alarm's detection, like the alarm itself.
 * Audit rows already dated so are left alone: a sealed row refuses even an update that changes nothing.
 */
async function dateAutomaticHolds(tx: Tx, endMs: number): Promise<void> {
  const moved = await tx.execute<{ id: number; placed_at: Date }>(sql`
    update lot_holds h set placed_at = a.detected_at from alarms a
    where h.alarm_id = a.id and h.placed_by is null and h.released_at is null and a.detected_at < ${new Date(endMs)}
    returning h.id, h.placed_at`);
  for (const h of moved.rows) {
    await tx.execute(sql`
      update audit_events set at = ${h.placed_at}
      where entity = 'lot' and action = 'hold automatically' and (after ->> 'holdId')::int = ${h.id} and at is distinct from ${h.placed_at}`);
  }
}

/** Releases a lot's open hold at `at`, through the app's own path. */
async function releaseAt(tx: Tx, at: number, r: Parameters<typeof releaseHold>[1]): Promise<void> {
  const id = await decidedAt(tx, new Date(at), () => releaseHold(tx, r));
  await tx.execute(sql`update lot_holds set released_at = ${new Date(at)} where id = ${id}`);
}

/** The lot with the lowest mean flow of HV Level 25 among `lots`, or null when none has a flow result. */
async function lowestFlowLot(tx: Tx, lots: LotRow[]): Promise<number | null> {
  const res = await tx.execute<{ lot_id: number }>(sql`
    select m.lot_id from measurements m join characteristics c on c.id = m.characteristic_id
    where c.code = 'HVL25-FLOW' and m.voided_at is null and m.lot_id = any(${sql.param(lots.map((l) => l.id))}::int[])
    group by m.lot_id order by avg(m.value), m.lot_id limit 1`);
  return res.rows[0]?.lot_id ?? null;
}

/**
 * Every open hold of the history but the kept lots' is released: at the moment the manager closed the
 * lot's out-of-specification alarm (its own first), with the reason that alarm's closing gives;
 * otherwise the working morning after the hold (never after the history's end), the retest having
 * passed. A hold placed at or after the end is the first morning's news and stays.
 */
async function releaseOtherHolds(tx: Tx, o: { endMs: number; managerId: number; keep: string[] }): Promise<void> {
  const { endMs, managerId: manager, keep } = o;
  const open = await tx.execute<{ lot_id: number; lot_number: string; placed_ms: number; closed_ms: number | null; close_note: string | null }>(sql`
    select h.lot_id, l.lot_number, (extract(epoch from h.placed_at) * 1000)::float8 as placed_ms,
           (extract(epoch from a.closed_at) * 1000)::float8 as closed_ms, a.close_note
    from lot_holds h join lots l on l.id = h.lot_id
    left join lateral (select a.closed_at, a.close_note from alarms a where a.lot_id = h.lot_id and a.rule = ${OUT_OF_SPEC} and a.resolution = 'by-user'
                       order by a.id = h.alarm_id desc, a.closed_at desc limit 1) a on true
    where h.released_at is null and h.placed_at < ${new Date(endMs)} and l.lot_number <> all(${sql.param(keep)}::text[])
    order by h.placed_at, h.id`);
  for (const h of open.rows) {
    const cause = Object.keys(releaseReasonOf).find((id) => causeNotes[id] === h.close_note);
    const placed = Number(h.placed_ms);
    const at = h.closed_ms !== null ? Math.max(Number(h.closed_ms), placed) : Math.max(placed, Math.min(nextWorkingMorning(placed), endMs));
    await releaseAt(tx, at, { lotId: h.lot_id, lotNumber: h.lot_number, reason: cause ? releaseReasonOf[cause] : RETESTED_RELEASE_REASON, actorId: manager });
  }
}

type Candidate = { id: number; characteristic_id: number; code: string; name: string; product_code: string; product_name: string; lot_number: string; produced_ms: number; detected_ms: number };

/**
 * The open investigation: the product whose open alarms of the last two weeks span the most
 * characteristics becomes one raw-material delivery's story. The manager groups its alarms on the
 * working morning after alarms on a second characteristic appeared; later ones join the morning after
 * they were detected. Alarms whose morning lies after the history's end stay new.
 */
async function groupInvestigation(tx: Tx, o: { endMs: number; manager: number; technician: number; skipLots: string[] }): Promise<number | null> {
  const rows = (
    await tx.execute<Candidate>(sql`
      select a.id, a.characteristic_id, c.code, c.name, p.code as product_code, p.name as product_name, l.lot_number,
             (extract(epoch from l.produced_at) * 1000)::float8 as produced_ms, (extract(epoch from a.detected_at) * 1000)::float8 as detected_ms
      from alarms a join characteristics c on c.id = a.characteristic_id join products p on p.id = c.product_id join lots l on l.id = a.lot_id
      where a.status in ('open', 'acknowledged') and a.group_id is null and a.rule not in (${OUT_OF_SPEC}, 'capability')
        and l.produced_at >= ${new Date(o.endMs - OPEN_DAYS * DAY)} and a.detected_at < ${new Date(o.endMs)}
        and l.lot_number <> all(${sql.param(o.skipLots)}::text[])
      order by a.detected_at, a.id`)
  ).rows.map((r) => ({ ...r, produced_ms: Number(r.produced_ms), detected_ms: Number(r.detected_ms) }));
  type Plan = { members: (Candidate & { joins: number })[]; createdAt: number; characteristics: number };
  let best: Plan | null = null;
  for (const product of [...new Set(rows.map((r) => r.product_code))].sort()) {
    const own = rows.filter((r) => r.product_code === product);
    const second = own.find((r) => r.code !== own[0].code);
    if (!second) continue;
    const createdAt = nextWorkingMorning(second.detected_ms);
    if (createdAt > o.endMs) continue;
    const members = own
      .map((r) => ({ ...r, joins: Math.max(createdAt, nextWorkingMorning(r.detected_ms)) }))
      .filter((r) => r.joins <= o.endMs)
      .slice(0, 12);
    const characteristics = new Set(members.map((m) => m.code)).size;
    if (characteristics < 2) continue;
    if (!best || characteristics > best.characteristics || (characteristics === best.characteristics && members.length > best.members.length)) best = { members, createdAt, characteristics };
  }
  if (!best) return null;
  const { members, createdAt } = best;
  const first = [...members].sort((a, b) => a.produced_ms - b.produced_ms || a.lot_number.localeCompare(b.lot_number))[0];
  const material = deliveryOf[first.product_code] ?? 'raw-material';
  // A characteristic's name reads "<product> · <property> · <age>": the note names the property and age.
  const names = [...new Set(members.map((m) => m.name.split(' · ').slice(1).join(' at ') || m.code))];
  const title = `${first.product_name}: alarms on ${names.length} characteristics after a new ${material} delivery`;
  const note = `The lots from ${first.lot_number} on are the first made with the new ${material} delivery; ${names.slice(0, -1).join(', ')} and ${names.at(-1)} moved at the same time. Retained samples kept until the supplier answers.`;
  const [group] = (
    await tx.execute<{ id: number }>(sql`
      insert into alarm_groups (title, note, created_by, created_at) values (${title}, ${note}, ${o.manager}, ${new Date(createdAt)}) returning id`)
  ).rows;
  await decidedAt(tx, new Date(createdAt), () => recordAudit(tx, { actorId: o.manager, entity: 'alarm group', action: 'create', entityId: group.id, after: { title, note } }));
  for (const m of members) {
    const at = new Date(m.joins);
    await tx.execute(sql`
      update alarms set status = 'investigating', group_id = ${group.id}, assignee_id = ${o.manager}, investigating_at = ${at}, investigating_by = ${o.manager}, updated_at = ${at}
      where id = ${m.id}`);
    await decidedAt(tx, at, () =>
      recordAudit(tx, [
        { actorId: o.manager, entity: 'alarm', action: 'group', entityId: m.id, after: { groupId: group.id } },
        { actorId: o.manager, entity: 'alarm', action: 'assign', entityId: m.id, after: { assigneeId: o.manager } },
        { actorId: o.manager, entity: 'alarm', action: 'investigate', entityId: m.id, before: { status: 'open' }, after: { status: 'investigating' } },
      ]),
    );
  }
  const onFirst = members.find((m) => m.joins === createdAt)!;
  const comments = [
    { at: createdAt + 3 * HOUR, author: o.technician, body: `Retained sample of ${onFirst.lot_number} mixed again: the reading repeats, so not a test error. Equipment checks of the day all in order.` },
    { at: createdAt + 5 * HOUR, author: o.manager, body: `Asked the supplier for the certificate of the ${material} delivery and their own results for it. The lab keeps the retained samples of the lots concerned until the answer.` },
  ];
  for (const c of comments) {
    const [row] = (
      await tx.execute<{ id: number }>(sql`
        insert into alarm_comments (alarm_id, author_id, body, created_at) values (${onFirst.id}, ${c.author}, ${c.body}, ${new Date(c.at)}) returning id`)
    ).rows;
    await decidedAt(tx, new Date(c.at), () => recordAudit(tx, { actorId: c.author, entity: 'alarm', action: 'comment', entityId: onFirst.id, after: { commentId: row.id, body: c.body } }));
  }
  return group.id;
}
