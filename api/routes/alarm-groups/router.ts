import { Router } from 'express';
import { sql } from 'drizzle-orm';
import { signalName } from '@shared/spc';
import type { AlarmGroupView, AlarmStatus } from '@shared/schemas/alarms';
import type { Database } from '@api/db/client';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { alarmsInContext, groupAlarms } from '@api/spc/alarms';
import { alarmGroupIdParamsSchema, createAlarmGroupSchema } from './schema';

const isoOf = (d: Date) => new Date(d).toISOString();

/** Investigations of several alarms: a manager groups alarms of one cause under a title. */
export function alarmGroupsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);

  router.post('/', requirePermission('alarm.triage'), async (req, res) => {
    const body = parseBody(createAlarmGroupSchema, req.body);
    const id = await db.transaction((tx) => groupAlarms(tx, { title: body.title, note: body.note ?? null, alarmIds: body.alarmIds, userId: req.user!.id }));
    res.status(201).json(await groupOf(db, id));
  });

  router.get('/:id', requirePermission('alarm.read'), async (req, res) => {
    const { id } = parseBody(alarmGroupIdParamsSchema, req.params);
    const group = await groupOf(db, id);
    if (!group) throw notFound(`Investigation ${id}`);
    res.json(group);
  });
  return router;
}

/** The investigation with its members (at most 500, as many as a request may group). */
export async function groupOf(db: Database, id: number): Promise<AlarmGroupView | null> {
  const g = await db.execute<{ id: number; title: string; note: string | null; created_by: string | null; created_at: Date }>(sql`
    select g.id, g.title, g.note, u.name as created_by, g.created_at from alarm_groups g left join users u on u.id = g.created_by where g.id = ${id}`);
  if (!g.rows[0]) return null;
  const members = await db.execute<{ id: number; code: string; lot_number: string; rule: string; status: AlarmStatus }>(sql`
    select a.id, c.code, l.lot_number, a.rule, a.status ${alarmsInContext} where a.group_id = ${id} order by a.id limit 500`);
  const r = g.rows[0];
  return {
    id: r.id,
    title: r.title,
    note: r.note,
    createdBy: r.created_by,
    createdAt: isoOf(r.created_at),
    members: members.rows.map((m) => ({ id: m.id, characteristicCode: m.code, lotNumber: m.lot_number, signal: signalName(m.rule), status: m.status })),
  };
}

