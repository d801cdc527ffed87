import type { DB } from '../db';

export async function getSetting<T>(db: DB, key: string, fallback: T): Promise<T> {
	const row = await db.selectFrom('lab_setting').select('value_json').where('key', '=', key).executeTakeFirst();
	return row ? (JSON.parse(row.value_json) as T) : fallback;
}

export async function putSetting(db: DB, key: string, value: unknown): Promise<void> {
	const value_json = JSON.stringify(value);
	await db
		.insertInto('lab_setting')
		.values({ key, value_json })
		.onConflict((oc) => oc.column('key').doUpdateSet({ value_json }))
		.execute();
}

export function labName(db: DB): Promise<string> {
	return getSetting(db, 'lab.name', 'Temperature laboratory');
}
