import { z } from 'zod';
import { roles, type Role } from './roles';

export { roles, roleLabels, type Role } from './roles';

export const roleSchema = z.enum(roles, { message: 'Choose one of: technician, quality manager, auditor, administrator' });

const email = z
  .string({ message: 'E-mail is required' })
  .trim()
  .toLowerCase()
  .min(1, 'E-mail is required')
  .max(254, 'E-mail is too long')
  .email('Enter a valid e-mail address');

const password = z
  .string({ message: 'Password is required' })
  .min(10, 'Use at least 10 characters for a password')
  .max(200, 'Password is too long');

/** POST /api/v1/auth/login */
export const loginSchema = z.object({
  /** The user's e-mail address, case-insensitive. */
  email,
  /** The password as typed. */
  password: z.string({ message: 'Password is required' }).min(1, 'Password is required').max(200, 'Password is too long'),
});
export type LoginInput = z.infer<typeof loginSchema>;

/** POST /api/v1/users */
export const createUserSchema = z.object({
  /** Sign-in address; unique across the plant. */
  email,
  /** Full name as shown in records and the audit trail. */
  name: z.string({ message: 'Name is required' }).trim().min(2, 'Name needs at least 2 characters').max(120, 'Name is too long'),
  /** What the user may do. */
  role: roleSchema,
  /** Initial password; the user should change it. */
  password,
});
export type CreateUserInput = z.infer<typeof createUserSchema>;

/** PATCH /api/v1/users/:id — change role, name, activity or password. */
export const updateUserSchema = z
  .object({
    /** New display name. */
    name: createUserSchema.shape.name.optional(),
    /** New role. */
    role: roleSchema.optional(),
    /** false deactivates the user: sign-in is refused, records keep the name. */
    active: z.boolean({ message: 'active must be true or false' }).optional(),
    /** New password, set by an administrator. */
    password: password.optional(),
  })
  .strict()
  .refine((v) => Object.keys(v).length > 0, { message: 'Nothing to change: send name, role, active or password' });
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

/** A user as the API returns it (never with the password hash). */
export interface PublicUser {
  id: number;
  email: string;
  name: string;
  role: Role;
  active: boolean;
  createdAt: string;
}

/** GET /api/v1/people items: an active user someone may assign an alarm, an NCR or an action to. */
export interface Person {
  id: number;
  name: string;
  role: Role;
}
