// Seed step: the demo accounts (server/seed/demo-accounts.ts), verified, with the demo password.
// Idempotent: an existing account keeps its password and data and only regains missing demo roles.
import type { AppContext } from '../context.js';
import { User } from '../entities/User.js';
import { createPasswordUser } from '../services/users.js';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from './demo-accounts.js';

export async function seedAccounts(ctx: AppContext, log: (line: string) => void = console.log): Promise<void> {
  const repo = ctx.db.getRepository(User);
  for (const account of DEMO_ACCOUNTS) {
    const existing = await repo.findOneBy({ email: account.email });
    if (!existing) {
      await createPasswordUser(ctx, { ...account, password: DEMO_PASSWORD }, { verified: true });
      log(`demo account created: ${account.email} (${account.roles.join(', ')})`);
      continue;
    }
    const missing = account.roles.filter((role) => !existing.roles.includes(role));
    if (missing.length || !existing.emailVerifiedAt) {
      existing.roles = [...existing.roles, ...missing];
      existing.emailVerifiedAt ??= new Date();
      await repo.save(existing);
      log(`demo account updated: ${account.email}${missing.length ? ` (roles back: ${missing.join(', ')})` : ''}`);
    }
  }
}
