// Accounts: creation, password checks, Google linking, profile changes and role administration.
import bcrypt from 'bcryptjs';
import { randomBytes } from 'node:crypto';
import type { AppContext } from '../context.js';
import { User } from '../entities/User.js';
import { badRequest, conflict, notFound } from '../http/errors.js';
import type { Role } from '../../shared/roles.js';

/** bcrypt work factor: 12 rounds is the common-practice floor for interactive logins (OWASP Password Storage Cheat Sheet). */
export const BCRYPT_COST = 12;

export interface NewPasswordUser {
  name: string;
  email: string;
  password: string;
  roles: Role[];
}

export function hashPassword(password: string, cost: number = BCRYPT_COST): Promise<string> {
  return bcrypt.hash(password, cost);
}

// A hash of a random secret, compared against when the e-mail is unknown so that a miss costs as long as a hit
// (no account enumeration by timing).
let dummyHash: Promise<string> | null = null;
function timingDummy(): Promise<string> {
  dummyHash ??= bcrypt.hash(randomBytes(16).toString('hex'), BCRYPT_COST);
  return dummyHash;
}

const isUniqueViolation = (error: unknown): boolean => (error as { code?: string; driverError?: { code?: string } })?.driverError?.code === '23505' || (error as { code?: string })?.code === '23505';

export function findUserById(ctx: AppContext, id: string): Promise<User | null> {
  return ctx.db.getRepository(User).findOneBy({ id });
}

export function findUserByEmail(ctx: AppContext, email: string): Promise<User | null> {
  return ctx.db.getRepository(User).findOneBy({ email: email.trim().toLowerCase() });
}

/** Creates an e-mail/password account; 409 with a message on `email` when the address is taken. */
export async function createPasswordUser(
  ctx: AppContext,
  input: NewPasswordUser,
  options: { verified?: boolean; passwordHash?: string } = {},
): Promise<User> {
  const repo = ctx.db.getRepository(User);
  const email = input.email.trim().toLowerCase();
  const taken = () => conflict('An account with this e-mail address already exists.', { email: ['An account with this e-mail address already exists; sign in or reset the password.'] });
  if (await repo.existsBy({ email })) throw taken();
  const user = repo.create({
    name: input.name.trim(),
    email,
    passwordHash: options.passwordHash ?? (await hashPassword(input.password)),
    googleId: null,
    emailVerifiedAt: options.verified ? new Date() : null,
    roles: uniqueRoles(input.roles),
  });
  try {
    return await repo.save(user);
  } catch (error) {
    // Two sign-ups racing for one address: the unique index decides.
    if (isUniqueViolation(error)) throw taken();
    throw error;
  }
}

/** Returns the user when the password matches; null otherwise, in about the same time whether or not the e-mail exists. */
export async function authenticate(ctx: AppContext, email: string, password: string): Promise<User | null> {
  const user = await findUserByEmail(ctx, email);
  if (!user?.passwordHash) {
    await bcrypt.compare(password, await timingDummy());
    return null;
  }
  return (await bcrypt.compare(password, user.passwordHash)) ? user : null;
}

export interface GoogleIdentity {
  /** The stable subject identifier (`sub`). */
  id: string;
  email: string | null;
  emailVerified: boolean;
  name: string | null;
}

/** Why a Google sign-in was refused; shown to the person on the sign-in page. */
export class GoogleSignInRefused extends Error {}

/**
 * Finds the account for a Google identity: by Google subject first, then by verified e-mail (linking the two),
 * else creates a subscriber account. An unverified Google e-mail is never linked to an existing account,
 * since that would let whoever controls the Google account take over the Thence one.
 */
export async function signInWithGoogle(ctx: AppContext, identity: GoogleIdentity): Promise<User> {
  const repo = ctx.db.getRepository(User);
  const bySubject = await repo.findOneBy({ googleId: identity.id });
  if (bySubject) return bySubject;
  if (!identity.email || !identity.emailVerified) throw new GoogleSignInRefused('Google did not confirm an e-mail address for this account.');
  const email = identity.email.trim().toLowerCase();
  const byEmail = await repo.findOneBy({ email });
  if (byEmail) {
    if (byEmail.googleId && byEmail.googleId !== identity.id) throw new GoogleSignInRefused('This e-mail address is linked to another Google account.');
    byEmail.googleId = identity.id;
    // Google vouches for the address, which is what our own verification mail would prove.
    byEmail.emailVerifiedAt ??= new Date();
    return repo.save(byEmail);
  }
  const created = repo.create({
    name: identity.name?.trim() || email.split('@')[0],
    email,
    passwordHash: null,
    googleId: identity.id,
    emailVerifiedAt: new Date(),
    roles: ['subscriber'],
  });
  try {
    return await repo.save(created);
  } catch (error) {
    if (isUniqueViolation(error)) return signInWithGoogle(ctx, identity);
    throw error;
  }
}

export async function markEmailVerified(ctx: AppContext, userId: string): Promise<User> {
  const repo = ctx.db.getRepository(User);
  const user = await repo.findOneBy({ id: userId });
  if (!user) throw notFound('The account no longer exists.');
  user.emailVerifiedAt ??= new Date();
  return repo.save(user);
}

export async function updateName(ctx: AppContext, userId: string, name: string): Promise<User> {
  const repo = ctx.db.getRepository(User);
  const user = await repo.findOneBy({ id: userId });
  if (!user) throw notFound('The account no longer exists.');
  user.name = name.trim();
  return repo.save(user);
}

/** Changes the password after checking the current one (400 on `currentPassword` when it is wrong). */
export async function changePassword(ctx: AppContext, userId: string, currentPassword: string, newPassword: string): Promise<void> {
  const user = await findUserById(ctx, userId);
  if (!user) throw notFound('The account no longer exists.');
  if (!user.passwordHash) {
    throw badRequest('This account signs in with Google and has no password yet.', {
      currentPassword: ['This account has no password yet; use "forgot password" to set one.'],
    });
  }
  if (!(await bcrypt.compare(currentPassword, user.passwordHash))) {
    throw badRequest('The current password is not correct.', { currentPassword: ['The current password is not correct.'] });
  }
  await setPassword(ctx, userId, newPassword);
}

export async function setPassword(ctx: AppContext, userId: string, password: string): Promise<void> {
  await ctx.db.getRepository(User).update({ id: userId }, { passwordHash: await hashPassword(password) });
}

/**
 * Ends the user's stored sessions (all of them, or all but `keepSid`), so a changed password locks out
 * whoever held the old one. Reads the session rows connect-pg-simple writes (passport keeps the id at sess.passport.user).
 */
export async function endSessions(ctx: AppContext, userId: string, keepSid?: string): Promise<void> {
  await ctx.pool.query(`DELETE FROM session WHERE sess -> 'passport' ->> 'user' = $1 AND sid <> $2`, [userId, keepSid ?? '']);
}

export interface UserListEntry {
  id: string;
  email: string;
  name: string;
  roles: Role[];
  emailVerified: boolean;
  createdAt: string;
}

/** One page of accounts, newest first, filtered by a case-insensitive substring of e-mail or name. */
export async function listUsers(
  ctx: AppContext,
  options: { search?: string; page: number; pageSize: number },
): Promise<{ users: UserListEntry[]; total: number }> {
  const query = ctx.db.getRepository(User).createQueryBuilder('u');
  const search = options.search?.trim();
  if (search) {
    // Escape LIKE wildcards so a search for "a_b" means the literal text.
    const pattern = `%${search.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    query.where('(u.email ILIKE :pattern OR u.name ILIKE :pattern)', { pattern });
  }
  const [rows, total] = await query
    .orderBy('u.created_at', 'DESC')
    .addOrderBy('u.id', 'ASC')
    .skip((options.page - 1) * options.pageSize)
    .take(options.pageSize)
    .getManyAndCount();
  return { users: rows.map(toListEntry), total };
}

export function toListEntry(user: User): UserListEntry {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    roles: [...user.roles],
    emailVerified: !!user.emailVerifiedAt,
    createdAt: user.createdAt.toISOString(),
  };
}

/** Replaces a user's roles. An admin may not drop their own admin role (someone must be able to undo mistakes). */
export async function setRoles(ctx: AppContext, actorId: string, targetId: string, roles: Role[]): Promise<User> {
  const repo = ctx.db.getRepository(User);
  const user = await repo.findOneBy({ id: targetId });
  if (!user) throw notFound('No user with this id.');
  const next = uniqueRoles(roles);
  if (actorId === targetId && user.roles.includes('admin') && !next.includes('admin')) {
    throw badRequest('You cannot remove your own admin role; ask another admin.', { roles: ['You cannot remove your own admin role.'] });
  }
  user.roles = next;
  return repo.save(user);
}

function uniqueRoles(roles: Role[]): Role[] {
  const order: Role[] = ['publisher', 'subscriber', 'admin'];
  return order.filter((role) => roles.includes(role));
}
