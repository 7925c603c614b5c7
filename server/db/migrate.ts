// Runs pending TypeORM migrations and exits; used by the start and test scripts.
import { connect, createDataSource } from './data-source.js';

try {
  const dataSource = await connect(createDataSource());
  const applied = await dataSource.runMigrations({ transaction: 'each' });
  console.log(applied.length ? `migrations applied: ${applied.map((m) => m.name).join(', ')}` : 'migrations: up to date');
  await dataSource.destroy();
} catch (error) {
  console.error((error as Error).message);
  process.exit(1);
}
