/** POST /api/v1/auth/login body: shared with the sign-in form. */
export { loginSchema, type LoginInput } from '@shared/schemas/users';
