import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '../../src/lib/server/demo/scenario';
import { signInCookie, startTestServer, type TestServer } from '../support/server';

let server: TestServer;
beforeAll(async () => {
	server = await startTestServer();
});
afterAll(async () => {
	await server?.stop();
});

describe('sign-in against the real server', () => {
	it('gives a session cookie for a right password and none for a wrong one', async () => {
		const admin = DEMO_USERS.find((u) => u.role === 'admin')!;
		const cookie = await signInCookie(server.baseUrl, admin.email, admin.password);
		const me = await fetch(`${server.baseUrl}/api/v1/me`, { headers: { cookie } });
		expect(me.status).toBe(200);
		expect((await me.json()).user.role).toBe('admin');

		const bad = await fetch(`${server.baseUrl}/sign-in`, {
			method: 'POST',
			redirect: 'manual',
			headers: { origin: server.baseUrl, accept: 'text/html', 'content-type': 'application/x-www-form-urlencoded' },
			body: new URLSearchParams({ email: admin.email, password: 'not-the-password' })
		});
		expect(bad.status).toBe(400);
		expect(bad.headers.getSetCookie().some((c) => c.includes('session_token=') && !c.includes('session_token=;'))).toBe(false);
		expect(await bad.text()).toContain('do not match');
	});

	it('refuses a form post from another origin (SvelteKit CSRF check stays on)', async () => {
		const res = await fetch(`${server.baseUrl}/sign-in`, {
			method: 'POST',
			redirect: 'manual',
			headers: { origin: 'http://elsewhere.invalid', 'content-type': 'application/x-www-form-urlencoded' },
			body: new URLSearchParams({ email: 'a@b.example', password: 'x' })
		});
		expect(res.status).toBe(403);
	});
});
