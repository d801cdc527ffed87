import type { Kysely } from 'kysely';

// Tables better-auth reads and writes (email + password, admin plugin, database rate limits).
// Column names are better-auth's own (camelCase); a test compares them with better-auth's schema.
// Frozen in time: this file takes Kysely<any> and imports no application code.
export async function up(db: Kysely<any>): Promise<void> {
	await db.schema
		.createTable('user')
		.addColumn('id', 'text', (c) => c.primaryKey().notNull())
		.addColumn('name', 'text', (c) => c.notNull())
		.addColumn('email', 'text', (c) => c.notNull().unique())
		.addColumn('emailVerified', 'integer', (c) => c.notNull())
		.addColumn('image', 'text')
		.addColumn('createdAt', 'date', (c) => c.notNull())
		.addColumn('updatedAt', 'date', (c) => c.notNull())
		.addColumn('role', 'text')
		.addColumn('banned', 'integer')
		.addColumn('banReason', 'text')
		.addColumn('banExpires', 'date')
		.execute();
	await db.schema
		.createTable('session')
		.addColumn('id', 'text', (c) => c.primaryKey().notNull())
		.addColumn('expiresAt', 'date', (c) => c.notNull())
		.addColumn('token', 'text', (c) => c.notNull().unique())
		.addColumn('createdAt', 'date', (c) => c.notNull())
		.addColumn('updatedAt', 'date', (c) => c.notNull())
		.addColumn('ipAddress', 'text')
		.addColumn('userAgent', 'text')
		.addColumn('userId', 'text', (c) => c.notNull().references('user.id').onDelete('cascade'))
		.addColumn('impersonatedBy', 'text')
		.execute();
	await db.schema
		.createTable('account')
		.addColumn('id', 'text', (c) => c.primaryKey().notNull())
		.addColumn('accountId', 'text', (c) => c.notNull())
		.addColumn('providerId', 'text', (c) => c.notNull())
		.addColumn('userId', 'text', (c) => c.notNull().references('user.id').onDelete('cascade'))
		.addColumn('accessToken', 'text')
		.addColumn('refreshToken', 'text')
		.addColumn('idToken', 'text')
		.addColumn('accessTokenExpiresAt', 'date')
		.addColumn('refreshTokenExpiresAt', 'date')
		.addColumn('scope', 'text')
		.addColumn('password', 'text')
		.addColumn('createdAt', 'date', (c) => c.notNull())
		.addColumn('updatedAt', 'date', (c) => c.notNull())
		.execute();
	await db.schema
		.createTable('verification')
		.addColumn('id', 'text', (c) => c.primaryKey().notNull())
		.addColumn('identifier', 'text', (c) => c.notNull())
		.addColumn('value', 'text', (c) => c.notNull())
		.addColumn('expiresAt', 'date', (c) => c.notNull())
		.addColumn('createdAt', 'date', (c) => c.notNull())
		.addColumn('updatedAt', 'date', (c) => c.notNull())
		.execute();
	await db.schema
		.createTable('rateLimit')
		.addColumn('id', 'text', (c) => c.primaryKey().notNull())
		.addColumn('key', 'text', (c) => c.notNull().unique())
		.addColumn('count', 'integer', (c) => c.notNull())
		.addColumn('lastRequest', 'bigint', (c) => c.notNull())
		.execute();
	await db.schema.createIndex('session_userId_idx').on('session').column('userId').execute();
	await db.schema.createIndex('account_userId_idx').on('account').column('userId').execute();
	await db.schema.createIndex('verification_identifier_idx').on('verification').column('identifier').execute();
}

export async function down(db: Kysely<any>): Promise<void> {
	for (const t of ['rateLimit', 'verification', 'account', 'session', 'user']) {
		await db.schema.dropTable(t).execute();
	}
}
