import { z } from 'zod';

/** POST /api/v1/users and PATCH /api/v1/users/:id bodies: shared with the admin forms. */
export { createUserSchema, updateUserSchema, type CreateUserInput, type UpdateUserInput } from '@shared/schemas/users';

/** :id path parameter of /api/v1/users/:id. */
export const userIdParamsSchema = z.object({
  /** Numeric user id. */
  id: z.coerce.number({ message: 'User id must be a number' }).int('User id must be a whole number').positive('User id must be positive'),
});
export type UserIdParams = z.infer<typeof userIdParamsSchema>;
