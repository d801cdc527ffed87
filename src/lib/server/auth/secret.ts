import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname } from 'node:path';

/**
 * The session-signing secret: STILLPOINT_SECRET when set (production), otherwise a random one kept
 * beside the database so that a demo's sessions survive a restart. Never a constant in the code.
 */
export function authSecret(dbPath: string, env: Record<string, string | undefined> = process.env): string {
	const fromEnv = env.STILLPOINT_SECRET;
	if (fromEnv) {
		if (fromEnv.length < 32) throw new Error('STILLPOINT_SECRET must be at least 32 characters');
		return fromEnv;
	}
	const file = dbPath === ':memory:' ? null : `${dbPath}.secret`;
	if (file && existsSync(file)) return readFileSync(file, 'utf8').trim();
	const secret = randomBytes(32).toString('base64url');
	if (file) {
		mkdirSync(dirname(file), { recursive: true });
		writeFileSync(file, secret, { mode: 0o600 });
	}
	return secret;
}
