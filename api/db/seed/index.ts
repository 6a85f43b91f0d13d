import bcrypt from 'bcryptjs';
import { sql } from 'drizzle-orm';
import type { Role } from '../../../shared/schemas/users';
import type { Database } from '../client';
import { users } from '../schema';

/** The demo sign-ins printed in the README. Demo mode only. */
export const DEMO_PASSWORD = 'prismline-demo';
export const demoUsers: { email: string; name: string; role: Role }[] = [
  { email: 'admin@harrowvale.example', name: 'Demo Administrator', role: 'admin' },
  { email: 'manager@harrowvale.example', name: 'Demo Quality Manager', role: 'quality_manager' },
  { email: 'technician@harrowvale.example', name: 'Demo Technician', role: 'technician' },
  { email: 'auditor@harrowvale.example', name: 'Demo Auditor', role: 'auditor' },
];

/** Seeds the invented Harrow Vale plant when the database is empty; never touches existing data. */
export async function seedDemo(db: Database): Promise<void> {
  const [{ count }] = await db.select({ count: sql<number>`count(*)::int` }).from(users);
  if (count === 0) {
    const passwordHash = await bcrypt.hash(DEMO_PASSWORD, 10);
    await db.insert(users).values(demoUsers.map((u) => ({ ...u, passwordHash })));
  }
}
