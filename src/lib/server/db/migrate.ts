import { Migrator, type Kysely, type MigrationResultSet } from 'kysely';
import { migrations } from '../../../../migrations/index';

/** Applies every pending migration; safe to call on every start (a no-op when up to date). */
export async function migrateToLatest(db: Kysely<any>): Promise<MigrationResultSet> {
	const migrator = new Migrator({ db, provider: { getMigrations: async () => migrations } });
	const result = await migrator.migrateToLatest();
	if (result.error) {
		const failed = result.results?.find((r) => r.status === 'Error');
		throw new Error(`migration ${failed?.migrationName ?? '(unknown)'} failed: ${String(result.error)}`, {
			cause: result.error
		});
	}
	return result;
}
