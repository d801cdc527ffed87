import type { Kysely } from 'kysely';
import type SQLite from 'better-sqlite3';
import { createKysely, databasePath, openSqlite } from './connection';
import { migrateToLatest } from './migrate';
import type { Database } from './schema';

export type { Database } from './schema';
export type DB = Kysely<Database>;

interface AppDatabase {
	sqlite: SQLite.Database;
	db: DB;
	path: string;
	ready: Promise<void>;
}

// One connection per process, shared through globalThis because Vite's dev server may load this module twice.
const KEY = Symbol.for('stillpoint.database');
type WithDb = typeof globalThis & { [KEY]?: AppDatabase };

/** The process-wide database, opened and migrated on first use. */
export function appDatabase(): AppDatabase {
	const g = globalThis as WithDb;
	if (!g[KEY]) {
		const path = databasePath();
		const sqlite = openSqlite(path);
		const db = createKysely(sqlite);
		g[KEY] = { sqlite, db, path, ready: migrateToLatest(db).then(() => undefined) };
	}
	return g[KEY]!;
}

export { createKysely, databasePath, openSqlite, migrateToLatest };
