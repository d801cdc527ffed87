// `npm run migrate`: bring the database named by STILLPOINT_DB (default data/stillpoint.db) to the latest schema.
import { createKysely, databasePath, migrateToLatest, openSqlite } from '../src/lib/server/db/index';

const path = databasePath();
const db = createKysely(openSqlite(path));
const result = await migrateToLatest(db);
const applied = result.results?.filter((r) => r.status === 'Success').map((r) => r.migrationName) ?? [];
console.log(applied.length ? `Applied to ${path}: ${applied.join(', ')}` : `${path} is up to date.`);
await db.destroy();
