import SQLite from 'better-sqlite3';
import { Kysely, SqliteDialect } from 'kysely';
import { mkdirSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import type { Database } from './schema';

/** Where the database lives: STILLPOINT_DB, else data/stillpoint.db under the working directory. */
export function databasePath(env: Record<string, string | undefined> = process.env): string {
	return resolve(env.STILLPOINT_DB ?? 'data/stillpoint.db');
}

/**
 * Opens the SQLite file with the pragmas the product relies on:
 * WAL so readers never block the ingest writer, foreign keys on (SQLite leaves them off by default),
 * synchronous=NORMAL (the ingest writer fsyncs the WAL itself before it acknowledges readings: ingest/writer.ts).
 */
export function openSqlite(path: string): SQLite.Database {
	if (path !== ':memory:') mkdirSync(dirname(path), { recursive: true });
	const sqlite = new SQLite(path);
	sqlite.pragma('journal_mode = WAL');
	sqlite.pragma('foreign_keys = ON');
	sqlite.pragma('synchronous = NORMAL');
	sqlite.pragma('busy_timeout = 5000');
	return sqlite;
}

export function createKysely(sqlite: SQLite.Database): Kysely<Database> {
	return new Kysely<Database>({ dialect: new SqliteDialect({ database: sqlite }) });
}
