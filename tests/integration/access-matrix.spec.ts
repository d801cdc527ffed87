import { readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '../../src/lib/server/demo/scenario';
import { ROOT, signInCookie, startTestServer, type TestServer } from '../support/server';

// The expected answer of every route to a GET from each role, written out by hand (not derived from the
// product's access table, so that a wrong rule there fails here). 303s name where they lead.
type Who = 'anonymous' | 'technician' | 'supervisor' | 'engineer' | 'admin';
type Expect = number | `303 ${string}`;
const SIGN_IN = '303 /sign-in';
const MATRIX: Record<string, Record<Who, Expect>> = {
	'/': { anonymous: SIGN_IN, technician: '303 /benches', supervisor: '303 /benches', engineer: '303 /benches', admin: '303 /benches' },
	'/sign-in': { anonymous: 200, technician: '303 /benches', supervisor: '303 /benches', engineer: '303 /benches', admin: '303 /benches' },
	'/benches': { anonymous: SIGN_IN, technician: 200, supervisor: 200, engineer: 200, admin: 200 },
	'/runs': { anonymous: SIGN_IN, technician: 200, supervisor: 200, engineer: 200, admin: 200 },
	'/cells': { anonymous: SIGN_IN, technician: 200, supervisor: 200, engineer: 200, admin: 200 },
	'/thermometers': { anonymous: SIGN_IN, technician: 200, supervisor: 200, engineer: 200, admin: 200 },
	'/calculations': { anonymous: SIGN_IN, technician: 200, supervisor: 200, engineer: 200, admin: 200 },
	'/compare': { anonymous: SIGN_IN, technician: 403, supervisor: 200, engineer: 200, admin: 200 },
	'/alerts': { anonymous: SIGN_IN, technician: 403, supervisor: 200, engineer: 200, admin: 200 },
	'/alerts/rules': { anonymous: SIGN_IN, technician: 403, supervisor: 200, engineer: 403, admin: 200 },
	'/admin/mail': { anonymous: SIGN_IN, technician: 403, supervisor: 403, engineer: 403, admin: 200 },
	'/api/v1/alerts': { anonymous: 401, technician: 403, supervisor: 200, engineer: 200, admin: 200 },
	'/api/v1/alerts/count': { anonymous: 401, technician: 403, supervisor: 200, engineer: 200, admin: 200 },
	'/api/v1/alerts/rules': { anonymous: 401, technician: 403, supervisor: 200, engineer: 200, admin: 200 },
	'/admin': { anonymous: SIGN_IN, technician: 403, supervisor: 403, engineer: 403, admin: '303 /admin/users' },
	'/admin/users': { anonymous: SIGN_IN, technician: 403, supervisor: 403, engineer: 403, admin: 200 },
	'/admin/audit': { anonymous: SIGN_IN, technician: 403, supervisor: 403, engineer: 403, admin: 200 },
	'/sign-out': { anonymous: SIGN_IN, technician: '303 /benches', supervisor: '303 /benches', engineer: '303 /benches', admin: '303 /benches' },
	'/runs/new': { anonymous: SIGN_IN, technician: 200, supervisor: 200, engineer: 403, admin: 200 },
	'/runs/upload': { anonymous: SIGN_IN, technician: 403, supervisor: 200, engineer: 200, admin: 200 },
	'/calibrations': { anonymous: SIGN_IN, technician: 403, supervisor: 200, engineer: 200, admin: 200 },
	'/instruments': { anonymous: SIGN_IN, technician: 403, supervisor: 200, engineer: 403, admin: 200 },
	'/instruments/guide': { anonymous: SIGN_IN, technician: 200, supervisor: 200, engineer: 200, admin: 200 },
	'/api/v1/openapi.json': { anonymous: 200, technician: 200, supervisor: 200, engineer: 200, admin: 200 },
	// Instrument endpoint: a bench token, never a session, opens it.
	'/api/v1/bench/run': { anonymous: 401, technician: 401, supervisor: 401, engineer: 401, admin: 401 },
	// POST-only endpoints: a GET is refused once past the sign-in check.
	'/api/v1/documents': { anonymous: 401, technician: 405, supervisor: 405, engineer: 405, admin: 405 },
	'/api/v1/uploads': { anonymous: 401, technician: 405, supervisor: 405, engineer: 405, admin: 405 },
	'/api/v1/health': { anonymous: 200, technician: 200, supervisor: 200, engineer: 200, admin: 200 },
	'/api/v1/me': { anonymous: 401, technician: 200, supervisor: 200, engineer: 200, admin: 200 },
	'/api/v1/admin/users': { anonymous: 401, technician: 403, supervisor: 403, engineer: 403, admin: 200 }
};

/** Every page and endpoint in src/routes, as a URL path (groups dropped). */
function routePaths(): string[] {
	const base = join(ROOT, 'src/routes');
	const out = new Set<string>();
	const walk = (dir: string) => {
		for (const name of readdirSync(dir)) {
			const full = join(dir, name);
			if (statSync(full).isDirectory()) walk(full);
			else if (/^\+(page|page\.server|server)\.(svelte|ts)$/.test(name)) {
				const path = '/' + relative(base, dir).split('/').filter((s) => s && !/^\(.*\)$/.test(s)).join('/');
				out.add(path);
			}
		}
	};
	walk(base);
	return [...out].sort();
}

let server: TestServer;
const cookies: Partial<Record<Who, string>> = {};
beforeAll(async () => {
	server = await startTestServer();
	for (const role of ['technician', 'supervisor', 'engineer', 'admin'] as const) {
		const u = DEMO_USERS.find((d) => d.role === role)!;
		cookies[role] = await signInCookie(server.baseUrl, u.email, u.password);
	}
});
afterAll(async () => {
	await server?.stop();
});

describe('role × route access matrix', () => {
	it('covers every route that exists (parameterised routes are covered in their own tests)', () => {
		const concrete = routePaths().filter((p) => !p.includes('['));
		expect(concrete.filter((p) => !(p in MATRIX))).toEqual([]);
	});

	for (const [path, row] of Object.entries(MATRIX)) {
		for (const who of Object.keys(row) as Who[]) {
			it(`${who} GET ${path} → ${row[who]}`, async () => {
				const res = await fetch(server.baseUrl + path, { redirect: 'manual', headers: { accept: 'text/html', ...(cookies[who as Exclude<Who, 'anonymous'>] ? { cookie: cookies[who as Exclude<Who, 'anonymous'>]! } : {}) } });
				const expected = row[who];
				if (typeof expected === 'number') {
					expect(res.status).toBe(expected);
				} else {
					const [, target] = expected.split(' ');
					expect(res.status).toBe(303);
					expect(new URL(res.headers.get('location')!, server.baseUrl).pathname).toBe(target);
				}
			});
		}
	}

	it('refuses a forbidden write before any action runs (technician POST to an admin action)', async () => {
		const res = await fetch(`${server.baseUrl}/admin/users?/create`, {
			method: 'POST',
			redirect: 'manual',
			headers: { cookie: cookies.technician!, origin: server.baseUrl, 'content-type': 'application/x-www-form-urlencoded' },
			body: new URLSearchParams({ name: 'Intruder', email: 'x@kestrelvale.example', role: 'admin', password: 'long-enough-password' })
		});
		expect(res.status).toBe(403);
		const list = await fetch(`${server.baseUrl}/api/v1/admin/users`, { headers: { cookie: cookies.admin! } });
		expect(((await list.json()).users as { email: string }[]).some((u) => u.email === 'x@kestrelvale.example')).toBe(false);
	});
});
