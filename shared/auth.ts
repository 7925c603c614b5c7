// Request and response shapes for accounts and sign-in, shared by the client forms and the server routes.
import { z } from 'zod';
import { ROLES } from './roles.js';

export const emailSchema = z.string().trim().toLowerCase().email('Enter a valid e-mail address.').max(254, 'At most 254 characters.');
export const passwordSchema = z
  .string()
  .min(10, 'Use at least 10 characters.')
  .max(128, 'Use at most 128 characters.');

export const signUpSchema = z.object({
  name: z.string().trim().min(1, 'Enter your name.').max(120, 'At most 120 characters.'),
  email: emailSchema,
  password: passwordSchema,
  /** Roles asked for at sign-up; admin can never be self-granted. */
  roles: z.array(z.enum(['publisher', 'subscriber'])).min(1, 'Pick at least one role.').default(['subscriber']),
});
export type SignUpRequest = z.infer<typeof signUpSchema>;

export const signInSchema = z.object({ email: emailSchema, password: z.string().min(1, 'Enter your password.') });
export type SignInRequest = z.infer<typeof signInSchema>;

export const verifyEmailSchema = z.object({ token: z.string().min(10, 'The verification link is incomplete.') });
export const requestResetSchema = z.object({ email: emailSchema });
export const resetPasswordSchema = z.object({ token: z.string().min(10, 'The reset link is incomplete.'), password: passwordSchema });
export const updateAccountSchema = z.object({ name: z.string().trim().min(1, 'Enter your name.').max(120, 'At most 120 characters.') });
export const changePasswordSchema = z.object({ currentPassword: z.string().min(1, 'Enter your current password.'), newPassword: passwordSchema });

export const roleSchema = z.enum(ROLES);
export const setRolesSchema = z.object({ roles: z.array(roleSchema) });

/** The signed-in user as the client sees it (GET /api/auth/me → { user: SessionUser | null }). */
export interface SessionUser {
  id: string;
  email: string;
  name: string;
  roles: (typeof ROLES)[number][];
  emailVerified: boolean;
  hasPassword: boolean;
  google: boolean;
}

/** Every error response: { error: ApiErrorBody }. `fields` maps a form field to its messages (400 on invalid input). */
export interface ApiErrorBody {
  code: string;
  message: string;
  fields?: Record<string, string[]>;
}

/** Turns a zod error into per-field messages (the same shape the server sends and the forms show). */
export function fieldErrors(error: z.ZodError): Record<string, string[]> {
  const fields: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : '_';
    (fields[key] ??= []).push(issue.message);
  }
  return fields;
}
