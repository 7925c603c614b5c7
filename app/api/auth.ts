// Typed calls for sign-in, sign-up, e-mail verification, password reset and the account (server: /api/auth, /api/account).
import type {
  SessionUser,
  SignInRequest,
  SignUpRequest,
} from '@shared/auth';
import { api, resetCsrf } from './client';

interface UserBody {
  user: SessionUser;
}

/** The signed-in user, or null for a visitor. */
export async function fetchCurrentUser(): Promise<SessionUser | null> {
  const body = await api.get<{ user: SessionUser | null }>('/api/auth/me');
  return body.user;
}

export interface SignUpResult {
  user: SessionUser;
  /** False when the account exists but the verification mail could not be sent (the user can ask again). */
  verificationMailSent: boolean;
}

export async function signUp(request: SignUpRequest): Promise<SignUpResult> {
  const body = await api.post<UserBody & { verificationMailSent?: boolean }>('/api/auth/sign-up', request);
  // The session was regenerated on sign-in, and the CSRF token is bound to it.
  resetCsrf();
  return { user: body.user, verificationMailSent: body.verificationMailSent !== false };
}

export async function signIn(request: SignInRequest): Promise<SessionUser> {
  const body = await api.post<UserBody>('/api/auth/sign-in', request);
  resetCsrf();
  return body.user;
}

export async function signOut(): Promise<void> {
  try {
    await api.post<void>('/api/auth/sign-out');
  } finally {
    resetCsrf();
  }
}

export async function verifyEmail(token: string): Promise<SessionUser> {
  const body = await api.post<UserBody>('/api/auth/verify', { token });
  return body.user;
}

export function resendVerification(): Promise<void> {
  return api.post<void>('/api/auth/resend-verification');
}

export function requestPasswordReset(email: string): Promise<void> {
  return api.post<void>('/api/auth/request-reset', { email });
}

export function resetPassword(token: string, password: string): Promise<void> {
  return api.post<void>('/api/auth/reset', { token, password });
}

export async function updateAccount(name: string): Promise<SessionUser> {
  const body = await api.patch<UserBody>('/api/account', { name });
  return body.user;
}

export function changePassword(currentPassword: string, newPassword: string): Promise<void> {
  return api.post<void>('/api/account/password', { currentPassword, newPassword });
}

/** Which sign-in methods this server offers (Google only when its client id is configured). */
export interface SignInProviders {
  password: boolean;
  google: boolean;
}

export function fetchProviders(): Promise<SignInProviders> {
  return api.get<SignInProviders>('/api/auth/providers');
}

/**
 * Where the Google button points. It is a full-page navigation, not a fetch: the OAuth 2.0 flow
 * needs the browser to visit the provider and come back with the session cookie.
 */
export const GOOGLE_SIGN_IN_URL = '/api/auth/google';
