// `npm run seed`: load the demo laboratory into a fresh database (STILLPOINT_DB, default data/stillpoint.db).
import { createKysely, databasePath, migrateToLatest, openSqlite } from '../src/lib/server/db/index';
import { createAuth } from '../src/lib/server/auth/better-auth';
import { authSecret } from '../src/lib/server/auth/secret';
import { seedDemo } from '../src/lib/server/demo/seed';

const path = databasePath();
const db = createKysely(openSqlite(path));
await migrateToLatest(db);
const auth = createAuth({ db, secret: authSecret(path), baseURL: process.env.ORIGIN ?? 'http://localhost:3000' });
const result = await seedDemo(db, auth);
console.log(`Seeded ${path}: ${Object.keys(result.userIds).length} people, ${result.benchIds.length} benches, ${Object.keys(result.cellIds).length} cells.`);
await db.destroy();
