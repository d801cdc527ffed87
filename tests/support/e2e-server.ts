// Playwright's web server: a freshly seeded database and the built app on a fixed port.
import { rmSync, mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT, seededDatabase, startTestServer } from './server';

const port = Number(process.env.E2E_PORT ?? 4173);
const dir = join(ROOT, 'test-artifacts');
mkdirSync(dir, { recursive: true });
const dbPath = join(dir, 'e2e.db');
for (const suffix of ['', '-wal', '-shm', '.secret']) rmSync(dbPath + suffix, { force: true });
await seededDatabase(dbPath, { pastRuns: true });
const server = await startTestServer({ dbPath, port });
console.log(`e2e server on ${server.baseUrl}`);
const stop = () => server.stop().then(() => process.exit(0));
process.on('SIGTERM', stop);
process.on('SIGINT', stop);
