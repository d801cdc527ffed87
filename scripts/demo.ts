// `npm run demo`: a fresh demo laboratory on http://localhost:3000 — migrations, seed, the built app,
// and simulated benches streaming live realizations into it.
// Stops with Ctrl-C. The demo database lives in data/demo.db and is made anew on every start.
import { spawn, spawnSync } from 'node:child_process';
import { rmSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { createKysely, migrateToLatest, openSqlite } from '../src/lib/server/db/index';
import { createAuth } from '../src/lib/server/auth/better-auth';
import { authSecret } from '../src/lib/server/auth/secret';
import { seedDemo } from '../src/lib/server/demo/seed';
import { DEMO_USERS } from '../src/lib/server/demo/scenario';
import { startLiveBenches } from './demo-benches';
import { startFakeMailServer } from '../src/lib/server/mail/fake-server';

const port = Number(process.env.PORT ?? 3000);
const origin = `http://localhost:${port}`;
const dbPath = resolve(process.env.STILLPOINT_DB ?? 'data/demo.db');

console.log('Building the app…');
const build = spawnSync('npx', ['vite', 'build', '--logLevel', 'warn'], { stdio: 'inherit' });
if (build.status !== 0) process.exit(build.status ?? 1);

for (const suffix of ['', '-wal', '-shm']) rmSync(dbPath + suffix, { force: true });
const db = createKysely(openSqlite(dbPath));
await migrateToLatest(db);
console.log('Seeding the demo laboratory (past runs are simulated, a few seconds)…');
const seeded = await seedDemo(db, createAuth({ db, secret: authSecret(dbPath), baseURL: origin }));

// Alert e-mails go to a local fake SMTP server; admins read them on /admin/mail.
const mailStore = resolve(dirname(dbPath), 'demo-mail.jsonl');
rmSync(mailStore, { force: true });
const smtpPort = Number(process.env.STILLPOINT_DEMO_SMTP_PORT ?? 2525);
const mail = await startFakeMailServer({ port: smtpPort, store: mailStore });
const mailEnv = process.env.STILLPOINT_SMTP_URL || process.env.STILLPOINT_SMTP_HOST ? {} : { STILLPOINT_SMTP_URL: `smtp://127.0.0.1:${mail.port}`, STILLPOINT_FAKE_MAIL_STORE: mailStore };

const server = spawn(process.execPath, ['server.js'], {
	stdio: 'inherit',
	env: { STILLPOINT_PUBLIC_URL: origin, ...process.env, PORT: String(port), ORIGIN: origin, STILLPOINT_DB: dbPath, ...mailEnv }
});

// Wait for the app, then let the simulated benches stream into it.
for (let i = 0; ; i++) {
	try {
		if ((await fetch(`${origin}/api/v1/health`)).ok) break;
	} catch {
		/* not up yet */
	}
	if (i > 200) throw new Error('the app did not start');
	await new Promise((r) => setTimeout(r, 100));
}
const person = (role: string) => {
	const u = DEMO_USERS.find((d) => d.role === role)!;
	return { id: seeded.userIds[u.email], email: u.email, name: u.name, role: u.role };
};
const quiet = process.argv.includes('--quiet');
const stopBenches = await startLiveBenches(db, origin, person('technician'), person('supervisor'), (m) => {
	if (!quiet) console.log(`[bench] ${m}`);
});

const width = Math.max(...DEMO_USERS.map((u) => u.email.length));
console.log(`\nStillpoint demo: open ${origin} and sign in as one of\n`);
for (const u of DEMO_USERS) console.log(`  ${u.role.padEnd(11)} ${u.email.padEnd(width)}  ${u.password}`);
console.log(`\nAlert e-mails: local fake SMTP server on 127.0.0.1:${mail.port}, read them on ${origin}/admin/mail.`);
console.log('\nCtrl-C stops the demo.\n');

const stop = () => {
	void stopBenches().finally(() => {
		server.kill('SIGTERM');
		void mail.close();
	});
	setTimeout(() => process.exit(0), 3000).unref();
};
process.on('SIGINT', stop);
process.on('SIGTERM', stop);
server.on('exit', (code) => process.exit(code ?? 0));
