import SQLite from 'better-sqlite3';
import { CompiledQuery, Kysely, SqliteDialect, SqliteDriver, type DatabaseConnection, type Driver } from 'kysely';
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

/**
 * Kysely's SQLite driver opens transactions with a plain (deferred) BEGIN. In WAL mode a deferred
 * transaction that reads and then writes fails at once with SQLITE_BUSY_SNAPSHOT when another
 * connection committed in between; busy_timeout cannot help, since waiting would not refresh its
 * snapshot. Other connections do commit in between: the ingest of readings on another process, a
 * script finishing runs, the analysis worker. So every transaction takes the write lock when it
 * begins (BEGIN IMMEDIATE) and waits its turn under busy_timeout instead.
 */
class ImmediateSqliteDriver extends SqliteDriver {
	override async beginTransaction(connection: DatabaseConnection): Promise<void> {
		await connection.executeQuery(CompiledQuery.raw('begin immediate'));
	}
}

class ImmediateSqliteDialect extends SqliteDialect {
	constructor(private readonly sqlite: SQLite.Database) {
		super({ database: sqlite });
	}
	override createDriver(): Driver {
		return new ImmediateSqliteDriver({ database: this.sqlite });
	}
}

export function createKysely(sqlite: SQLite.Database): Kysely<Database> {
	return new Kysely<Database>({ dialect: new ImmediateSqliteDialect(sqlite) });
}
