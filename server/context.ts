// What every router and service receives: configuration, the database handles and outbound services.
import type { DataSource } from 'typeorm';
import type pg from 'pg';
import type { Config } from './config.js';

export interface AppContext {
  readonly config: Config;
  /** TypeORM, for entities. */
  readonly db: DataSource;
  /** Raw pg pool, for bulk loading (COPY) and hot-path queries. */
  readonly pool: pg.Pool;
}
