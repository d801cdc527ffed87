import { describe, expect, it } from 'vitest';
import { sql } from 'kysely';
import { getMigrations } from 'better-auth/db/migration';
import { createKysely, openSqlite } from './connection';
import { migrateToLatest } from './migrate';
import { createAuth } from '../auth/better-auth';
import { migrations } from '../../../../migrations/index';

function freshDb() {
	const sqlite = openSqlite(':memory:');
	return { sqlite, db: createKysely(sqlite) };
}

describe('migrations', () => {
	it('run from empty to latest, then again as a no-op', async () => {
		const { db, sqlite } = freshDb();
		const first = await migrateToLatest(db);
		expect(first.results?.map((r) => [r.migrationName, r.status])).toEqual(Object.keys(migrations).map((n) => [n, 'Success']));
		const second = await migrateToLatest(db);
		expect(second.results).toEqual([]);
		const tables = sqlite.prepare(`select name from sqlite_master where type = 'table' order by name`).all().map((r) => (r as { name: string }).name);
		for (const t of ['user', 'session', 'account', 'bench', 'cell', 'thermometer', 'thermometer_rtpw', 'standard_resistor', 'run', 'reading', 'run_event', 'alert_rule', 'alert_event', 'audit_log', 'bench_token']) {
			expect(tables).toContain(t);
		}
		await db.destroy();
	});

	it('give better-auth every table and column it expects (nothing left for its own migrator)', async () => {
		const { db } = freshDb();
		await migrateToLatest(db);
		const auth = createAuth({ db, secret: 'a-test-secret-of-enough-length-0123456789' });
		const pending = await getMigrations(auth.options);
		expect(pending.toBeCreated.map((t) => t.table)).toEqual([]);
		expect(pending.toBeAdded.map((t) => `${t.table}: ${Object.keys(t.fields).join(',')}`)).toEqual([]);
		await db.destroy();
	});

	it('store readings without a rowid, keyed by run and sequence number, refusing a duplicate', async () => {
		const { db, sqlite } = freshDb();
		await migrateToLatest(db);
		const ddl = (sqlite.prepare(`select sql from sqlite_master where name = 'reading'`).get() as { sql: string }).sql;
		expect(ddl.toLowerCase()).toContain('without rowid');
		expect(ddl.toLowerCase()).toContain('primary key (run_id, seq)');
		await db.destroy();
	});

	it('keep foreign keys on and the journal in WAL mode for a file database', async () => {
		const { mkdtempSync } = await import('node:fs');
		const { tmpdir } = await import('node:os');
		const { join } = await import('node:path');
		const sqlite = openSqlite(join(mkdtempSync(join(tmpdir(), 'sp-')), 'x.db'));
		expect(sqlite.pragma('journal_mode', { simple: true })).toBe('wal');
		expect(sqlite.pragma('foreign_keys', { simple: true })).toBe(1);
		sqlite.close();
	});

	it('make the audit trail append-only in the database itself', async () => {
		const { db } = freshDb();
		await migrateToLatest(db);
		await db.insertInto('audit_log').values({ at: 1, actor_id: null, actor_label: 'test', action: 'x', object_type: 'run', object_id: '1', summary: 's' }).execute();
		await expect(db.updateTable('audit_log').set({ summary: 'changed' }).execute()).rejects.toThrow(/append-only/);
		await expect(db.deleteFrom('audit_log').execute()).rejects.toThrow(/append-only/);
		const count = await db.selectFrom('audit_log').select(sql<number>`count(*)`.as('n')).executeTakeFirstOrThrow();
		expect(count.n).toBe(1);
		await db.destroy();
	});
});
