import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { sql } from 'kysely';
import { createKysely, openSqlite } from './connection';

const dirs: string[] = [];
afterEach(() => {
	for (const d of dirs.splice(0)) rmSync(d, { recursive: true, force: true });
});

function twoConnections() {
	const dir = mkdtempSync(join(tmpdir(), 'stillpoint-conn-'));
	dirs.push(dir);
	const path = join(dir, 'db.sqlite');
	const app = openSqlite(path);
	app.exec('create table t (id integer primary key, n integer not null)');
	app.exec('insert into t values (1, 0)');
	const other = openSqlite(path);
	// The other connection does not wait: a refusal shows at once who holds the write lock.
	other.pragma('busy_timeout = 0');
	return { app, other, db: createKysely(app) };
}

describe('app transactions on a WAL database shared with other connections', () => {
	it('hold the write lock from their first statement, so no commit slips in between a read and a write', async () => {
		const { app, other, db } = twoConnections();
		let otherWhileOpen: string | null = null;
		await db.transaction().execute(async (tx) => {
			const before = await sql<{ n: number }>`select n from t where id = 1`.execute(tx);
			// Under Kysely's plain BEGIN this commit would succeed here, and the update below would then
			// fail with SQLITE_BUSY_SNAPSHOT.
			try {
				other.prepare('update t set n = n + 100 where id = 1').run();
				otherWhileOpen = 'committed';
			} catch (e) {
				otherWhileOpen = (e as { code?: string }).code ?? 'error';
			}
			await sql`update t set n = ${before.rows[0].n + 1} where id = 1`.execute(tx);
		});
		expect(otherWhileOpen).toBe('SQLITE_BUSY');
		// Once the transaction is over, the other connection writes as usual.
		other.prepare('update t set n = n + 100 where id = 1').run();
		expect((app.prepare('select n from t where id = 1').get() as { n: number }).n).toBe(101);
		await db.destroy();
		other.close();
	});
});
