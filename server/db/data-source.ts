// The one TypeORM DataSource (schema by migrations only, never synchronize) and the raw pg pool beside it.
import 'reflect-metadata';
import { DataSource } from 'typeorm';
import pg from 'pg';
import { config } from '../config.js';
import { entities } from '../entities/index.js';
import { migrations } from '../migrations/index.js';

export function createDataSource(url: string = config.databaseUrl): DataSource {
  return new DataSource({ type: 'postgres', url, entities, migrations, synchronize: false, migrationsRun: false, logging: ['error'] });
}

export function createPool(url: string = config.databaseUrl, max = 10): pg.Pool {
  return new pg.Pool({ connectionString: url, max });
}

/** Connects or fails with a message that says where it tried and what to do. */
export async function connect(dataSource: DataSource): Promise<DataSource> {
  try {
    return await dataSource.initialize();
  } catch (error) {
    const where = config.databaseUrl.replace(/\/\/[^@]*@/, '//');
    throw new Error(`PostgreSQL is not reachable at ${where}: ${(error as Error).message}. Start it with \`npm start\` (which starts the local cluster) or set DATABASE_URL.`);
  }
}
