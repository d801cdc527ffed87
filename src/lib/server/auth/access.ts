import type { Role, SessionUser } from './types';

/**
 * Who may open which path. One table, consulted by `handle` on every request and by the role-matrix
 * test. `public`: anyone; `bench-token`: instrument endpoints that check their own bearer token;
 * `signed-in`: any role; a list: only those roles. The longest matching prefix wins. A `*` segment
 * matches any one path segment (e.g. a run id).
 */
export type Access = 'public' | 'bench-token' | 'signed-in' | readonly Role[];

export const ACCESS_RULES: readonly { prefix: string; access: Access }[] = [
	{ prefix: '/', access: 'signed-in' },
	{ prefix: '/sign-in', access: 'public' },
	{ prefix: '/api/auth', access: 'public' },
	{ prefix: '/api/v1/health', access: 'public' },
	{ prefix: '/api/v1/openapi.json', access: 'public' },
	{ prefix: '/api/v1/bench', access: 'bench-token' },
	{ prefix: '/api/v1/runs', access: 'signed-in' },
	// Instruments post readings with their bench token; the endpoint checks it (src/lib/server/ingest).
	{ prefix: '/api/v1/runs/*/readings', access: 'bench-token' },
	{ prefix: '/instruments', access: ['supervisor', 'admin'] },
	// The guide for instrument programmers holds no secrets: every signed-in role may read it.
	{ prefix: '/instruments/guide', access: 'signed-in' },
	{ prefix: '/runs/new', access: ['technician', 'supervisor', 'admin'] },
	{ prefix: '/runs/upload', access: ['engineer', 'supervisor', 'admin'] },
	{ prefix: '/compare', access: ['engineer', 'supervisor', 'admin'] },
	{ prefix: '/calibrations', access: ['engineer', 'supervisor', 'admin'] },
	{ prefix: '/alerts', access: ['supervisor', 'engineer', 'admin'] },
	{ prefix: '/alerts/rules', access: ['supervisor', 'admin'] },
	{ prefix: '/runs/*/review', access: ['supervisor', 'admin'] },
	{ prefix: '/api/v1/alerts', access: ['supervisor', 'engineer', 'admin'] },
	{ prefix: '/admin/mail', access: ['admin'] },
	{ prefix: '/admin', access: ['admin'] },
	{ prefix: '/api/v1/admin', access: ['admin'] }
];

function matches(prefix: string, path: string): boolean {
	if (prefix === '/') return true;
	if (prefix.includes('*')) {
		const want = prefix.split('/');
		const have = path.split('/');
		if (have.length < want.length) return false;
		return want.every((seg, i) => seg === '*' ? have[i] !== '' : seg === have[i]);
	}
	return path === prefix || path.startsWith(prefix.endsWith('/') ? prefix : `${prefix}/`);
}

export function accessFor(path: string): Access {
	let best = ACCESS_RULES[0];
	for (const rule of ACCESS_RULES) {
		if (matches(rule.prefix, path) && rule.prefix.length > best.prefix.length) best = rule;
	}
	return best.access;
}

export type AccessDecision = 'allow' | 'sign-in' | 'forbidden';

export function decideAccess(path: string, user: SessionUser | null): AccessDecision {
	return allows(accessFor(path), user);
}

export function allows(access: Access, user: SessionUser | null): AccessDecision {
	if (access === 'public' || access === 'bench-token') return 'allow';
	if (!user) return 'sign-in';
	if (access === 'signed-in') return 'allow';
	return access.includes(user.role) ? 'allow' : 'forbidden';
}

/** May this role open this path? For navigation: hide what a role cannot open. */
export function roleMayOpen(role: Role, path: string): boolean {
	const access = accessFor(path);
	if (access === 'public' || access === 'bench-token' || access === 'signed-in') return true;
	return access.includes(role);
}
