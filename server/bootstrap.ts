// Builds the AppContext for a process (server, worker, seed, tests): connects TypeORM and a pg pool.
import { config as defaultConfig, type Config } from './config.js';
import type { AppContext } from './context.js';
import { connect, createDataSource, createPool } from './db/data-source.js';

export async function createContext(config: Config = defaultConfig): Promise<AppContext> {
  const db = await connect(createDataSource(config.databaseUrl));
  const pool = createPool(config.databaseUrl, 20);
  return { config, db, pool };
}

export async function closeContext(ctx: AppContext): Promise<void> {
  await ctx.pool.end();
  await ctx.db.destroy();
}
