// NCR numbers: NCR-<year>-<4 digits>, one sequence per plant and year (the year at the plant), never
// reused and without gaps. The counter row is taken by an upsert inside the raising transaction: its row
// lock makes concurrent raisers wait for each other, and a raise that fails rolls its number back.
import { sql } from 'drizzle-orm';
import { plantDay } from '@shared/time';
import type { Executor } from '@api/spc/db';

export interface NcrNumber {
  year: number;
  sequence: number;
  number: string;
}

/** The text of a number: four digits at least, more once a plant passes 9,999 in a year. */
export const formatNcrNumber = (year: number, sequence: number) => `NCR-${year}-${String(sequence).padStart(4, '0')}`;

/** Takes the plant's next number of the plant's current year; call last in the raising transaction. */
export async function takeNcrNumber(tx: Executor, plantId: number, timeZone: string, now: Date = new Date()): Promise<NcrNumber> {
  const year = Number(plantDay(now, timeZone).slice(0, 4));
  const res = await tx.execute<{ last_number: number }>(sql`
    insert into ncr_counters (plant_id, year, last_number) values (${plantId}, ${year}, 1)
    on conflict (plant_id, year) do update set last_number = ncr_counters.last_number + 1
    returning last_number`);
  const sequence = res.rows[0].last_number;
  return { year, sequence, number: formatNcrNumber(year, sequence) };
}
