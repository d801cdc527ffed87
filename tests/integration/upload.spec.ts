// Past-run uploads and attached documents against the real built server (run `npx vite build` first).
import SQLite from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_USERS } from '../../src/lib/server/demo/scenario';
import { seededDatabase, signInCookie, startTestServer, type TestServer } from '../support/server';

let server: TestServer;
let ids: Awaited<ReturnType<typeof seededDatabase>>['seed'];
const cookies: Record<string, string> = {};
let db: SQLite.Database;

beforeAll(async () => {
	const seeded = await seededDatabase(undefined, { pastRuns: false });
	ids = seeded.seed;
	server = await startTestServer({ dbPath: seeded.dbPath });
	for (const role of ['technician', 'engineer', 'supervisor'] as const) {
		const u = DEMO_USERS.find((d) => d.role === role)!;
		cookies[role] = await signInCookie(server.baseUrl, u.email, u.password);
	}
	db = new SQLite(seeded.dbPath, { readonly: true });
}, 60_000);
afterAll(async () => {
	db?.close();
	await server?.stop();
});

async function call(role: string, method: string, path: string, body?: unknown, headers: Record<string, string> = {}) {
	const raw = body instanceof Uint8Array;
	return fetch(server.baseUrl + path, {
		method,
		headers: { cookie: cookies[role] ?? '', origin: server.baseUrl, ...(body === undefined ? {} : { 'content-type': raw ? 'application/octet-stream' : 'application/json' }), ...headers },
		body: body === undefined ? undefined : raw ? new Uint8Array(body) : JSON.stringify(body)
	});
}

/** Announces and sends `bytes` in the chunks the server asks for; returns the upload id. */
async function send(role: string, purpose: 'run-log' | 'document', filename: string, bytes: Uint8Array): Promise<string> {
	const created = await call(role, 'POST', '/api/v1/uploads', { purpose, filename, sizeBytes: bytes.length });
	expect(created.status).toBe(201);
	const { id, chunkBytes } = (await created.json()) as { id: string; chunkBytes: number };
	for (let offset = 0; offset < bytes.length; offset += chunkBytes) {
		const res = await call(role, 'POST', `/api/v1/uploads/${id}/chunk`, bytes.subarray(offset, offset + chunkBytes), { 'x-upload-offset': String(offset) });
		expect(res.status, await res.clone().text()).toBe(200);
	}
	return id;
}

async function parsed(role: string, id: string) {
	for (;;) {
		const s = (await (await call(role, 'GET', `/api/v1/uploads/${id}`)).json()) as { state: string; goodRows: number; badRows: number; problems: { line: number; field: string; reason: string }[]; message: string };
		if (s.state !== 'parsing') return s;
		await new Promise((r) => setTimeout(r, 100));
	}
}

const mapping = { delimiter: ',', headerRow: true, columns: { time: 0, ratio: 1, current: 2, channel: null, seq: null }, timeUnit: 'iso', timeZone: '+01:00', currentUnit: 'A', channelDefault: 2 };
const details = () => ({ benchId: ids.benchIds[0], cellId: ids.cellIds['KV-Ga-07'], thermometerId: ids.thermometerIds['KV-S-4471'], resistorId: ids.resistorIds['KV-R25-01'], fixedPoint: 'Ga', kind: 'melt', sensorDepthM: 0.165, gasPressurePa: 101325, notes: 'from a test' });
const runCount = () => (db.prepare('select count(*) as n from run').get() as { n: number }).n;
const readingCount = () => (db.prepare('select count(*) as n from reading').get() as { n: number }).n;

describe('past-run upload', () => {
	it('stores a good file as a finished run with its exact readings, only after confirm', async () => {
		// 2026-03-04 05:06:07.250 at +01:00 is 04:06:07.250Z: 1 772 597 167 250 ms (worked by hand in mapping.spec.ts).
		const csv = 'time,ratio,current\n2026-03-04 05:06:07.250,1.118131234,0.001\n2026-03-04 05:06:08.250,1.118131301,0.001\n\n# operator changed nothing\n2026-03-04 05:06:09.250,1.118131288,0.0014142\n';
		const runsBefore = runCount();
		const readingsBefore = readingCount();
		const id = await send('engineer', 'run-log', 'gallium-melt.csv', new TextEncoder().encode(csv));
		expect((await call('engineer', 'POST', `/api/v1/uploads/${id}/parse`, mapping)).status).toBe(202);
		const s = await parsed('engineer', id);
		expect(s).toMatchObject({ state: 'parsed', goodRows: 3, badRows: 0, problems: [] });
		expect(runCount()).toBe(runsBefore);
		expect(readingCount()).toBe(readingsBefore);

		const confirm = await call('engineer', 'POST', `/api/v1/uploads/${id}/confirm`, { ...details(), skipBadRows: false });
		expect(confirm.status).toBe(201);
		const { runId } = (await confirm.json()) as { runId: number };
		const run = db.prepare('select * from run where id = ?').get(runId) as Record<string, unknown>;
		expect(run).toMatchObject({ state: 'finished', fixed_point: 'Ga', kind: 'melt', reading_count: 3, highest_seq: 2, started_at: 1_772_597_167_250, ended_at: 1_772_597_169_250 });
		const readings = db.prepare('select seq, time_ms, ratio, current_ma, channel from reading where run_id = ? order by seq').all(runId);
		expect(readings).toEqual([
			{ seq: 0, time_ms: 1_772_597_167_250, ratio: 1.118131234, current_ma: 1, channel: 2 },
			{ seq: 1, time_ms: 1_772_597_168_250, ratio: 1.118131301, current_ma: 1, channel: 2 },
			{ seq: 2, time_ms: 1_772_597_169_250, ratio: 1.118131288, current_ma: 1.4142, channel: 2 }
		]);
		const audit = db.prepare(`select action, summary from audit_log where object_type = 'run' and object_id = ?`).all(String(runId)) as { action: string; summary: string }[];
		expect(audit.map((a) => a.action)).toEqual(['run.import']);
		// A second confirm of the same upload stores nothing more.
		expect((await call('engineer', 'POST', `/api/v1/uploads/${id}/confirm`, { ...details(), skipBadRows: false })).status).toBe(409);
		expect(runCount()).toBe(runsBefore + 1);
	});

	it('lists bad rows by line, column and reason; stores nothing until confirmed with skip', async () => {
		const lines = [
			'seq\ttime_ms\tratio\tcurrent_mA\tchannel',
			'10\t1772597167250\t1.1181312\t1.0\t1', // line 2 good
			'11\t1772597168250\tn/a\t1.0\t1', // line 3: ratio
			'12\t1772597169250\t1.1181313\t1000\t1', // line 4: current out of range
			'13\t\t1.1181314\t1.0\t1', // line 5: time empty
			'11\t1772597170250\t1.1181315\t1.0\t1', // line 6: duplicate seq 11 (line 3 was bad, so 11 is free!)
			'14\t1772597171250\t1.1181316\t1.0\t99', // line 7: channel
			'15\t1772597172250\t1.1181317', // line 8: too few columns
			'12\t1772597173250\t1.1181318\t1.0\t1', // line 9: seq 12 is free too (line 4 was bad)
			'10\t1772597174250\t1.1181319\t1.0\t1' // line 10: seq 10 already taken by line 2
		];
		const id = await send('engineer', 'run-log', 'tin.tsv', new TextEncoder().encode(lines.join('\n')));
		const m = { ...mapping, delimiter: '\t', timeUnit: 'epoch-ms', timeZone: 'UTC', currentUnit: 'mA', columns: { seq: 0, time: 1, ratio: 2, current: 3, channel: 4 } };
		expect((await call('engineer', 'POST', `/api/v1/uploads/${id}/parse`, m)).status).toBe(202);
		const s = await parsed('engineer', id);
		expect(s.state).toBe('parsed');
		expect(s.goodRows).toBe(3); // lines 2, 6, 9
		expect(s.badRows).toBe(6);
		expect(s.problems.map((p) => [p.line, p.field])).toEqual([
			[3, 'ratio'],
			[4, 'current'],
			[5, 'time'],
			[7, 'channel'],
			[8, 'row'],
			[10, 'seq']
		]);
		expect(s.problems.find((p) => p.line === 10)!.reason).toContain('seq 10');

		const before = runCount();
		const refused = await call('engineer', 'POST', `/api/v1/uploads/${id}/confirm`, { ...details(), skipBadRows: false });
		expect(refused.status).toBe(409);
		expect(((await refused.json()) as { error: { code: string } }).error.code).toBe('bad_rows');
		expect(runCount()).toBe(before);

		const ok = await call('engineer', 'POST', `/api/v1/uploads/${id}/confirm`, { ...details(), skipBadRows: true });
		expect(ok.status).toBe(201);
		const { runId } = (await ok.json()) as { runId: number };
		expect(db.prepare('select seq from reading where run_id = ? order by seq').all(runId)).toEqual([{ seq: 10 }, { seq: 11 }, { seq: 12 }]);
	});

	it('refuses a mapping with a column used twice, a cell of another fixed point, and a technician', async () => {
		const id = await send('engineer', 'run-log', 'x.csv', new TextEncoder().encode('time,ratio,current\n2026-03-04T00:00:00Z,1.1,1\n'));
		const bad = await call('engineer', 'POST', `/api/v1/uploads/${id}/parse`, { ...mapping, columns: { ...mapping.columns, current: 1 } });
		expect(bad.status).toBe(422);
		expect((await call('engineer', 'POST', `/api/v1/uploads/${id}/parse`, { ...mapping, currentUnit: 'mA' })).status).toBe(202);
		await parsed('engineer', id);
		const wrong = await call('engineer', 'POST', `/api/v1/uploads/${id}/confirm`, { ...details(), fixedPoint: 'Zn', skipBadRows: false });
		expect(wrong.status).toBe(422);
		// Someone else's upload is not visible to them.
		expect((await call('supervisor', 'GET', `/api/v1/uploads/${id}`)).status).toBe(404);
		expect((await call('technician', 'POST', '/api/v1/uploads', { purpose: 'run-log', filename: 'a.csv', sizeBytes: 10 })).status).toBe(403);
		expect((await fetch(`${server.baseUrl}/api/v1/uploads`, { method: 'POST' })).status).toBe(401);
		// Discarding removes it.
		expect((await call('engineer', 'DELETE', `/api/v1/uploads/${id}`)).status).toBe(204);
		expect((await call('engineer', 'GET', `/api/v1/uploads/${id}`)).status).toBe(404);
	});

	it('refuses an announced size over the limit (413) and a chunk past the announced size (413)', async () => {
		expect((await call('engineer', 'POST', '/api/v1/uploads', { purpose: 'run-log', filename: 'huge.csv', sizeBytes: 200 * 1024 * 1024 + 1 })).status).toBe(413);
		const created = await call('engineer', 'POST', '/api/v1/uploads', { purpose: 'run-log', filename: 'small.csv', sizeBytes: 10 });
		const { id } = (await created.json()) as { id: string };
		expect((await call('engineer', 'POST', `/api/v1/uploads/${id}/chunk`, new Uint8Array(11), { 'x-upload-offset': '0' })).status).toBe(413);
		// A chunk that skips ahead is refused with the offset to resume from.
		const gap = await call('engineer', 'POST', `/api/v1/uploads/${id}/chunk`, new Uint8Array(2), { 'x-upload-offset': '4' });
		expect(gap.status).toBe(409);
		expect(((await gap.json()) as { error: { details: { receivedBytes: number } } }).error.details.receivedBytes).toBe(0);
	});
});

describe('documents', () => {
	const pdf = new TextEncoder().encode('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');

	it('refuses a file that is not a PDF by its content (415), whatever its name', async () => {
		const created = await call('engineer', 'POST', '/api/v1/uploads', { purpose: 'document', filename: 'assay.pdf', sizeBytes: 20 });
		const { id } = (await created.json()) as { id: string };
		const res = await call('engineer', 'POST', `/api/v1/uploads/${id}/chunk`, new TextEncoder().encode('PK\u0003\u0004 not a pdf....'), { 'x-upload-offset': '0' });
		expect(res.status).toBe(415);
		expect(((await res.json()) as { error: { code: string } }).error.code).toBe('not_pdf');
	});

	it('refuses a document over 10 MiB (413)', async () => {
		const res = await call('engineer', 'POST', '/api/v1/uploads', { purpose: 'document', filename: 'scan.pdf', sizeBytes: 10 * 1024 * 1024 + 1 });
		expect(res.status).toBe(413);
	});

	it('attaches a PDF to a cell, serves it to every role with the right headers, and audits attach and removal', async () => {
		// Over one chunk (512 KiB), so the document also travels in pieces.
		const big = new Uint8Array(700 * 1024);
		big.set(pdf);
		const id = await send('engineer', 'document', 'Ga-07 assay ü.pdf', big);
		const cellId = ids.cellIds['KV-Ga-07'];
		const attached = await call('engineer', 'POST', '/api/v1/documents', { uploadId: id, ownerType: 'cell', ownerId: cellId, kind: 'assay', title: 'Supplier assay' });
		expect(attached.status).toBe(201);
		const { id: docId } = (await attached.json()) as { id: number };

		const got = await call('technician', 'GET', `/api/v1/documents/${docId}`);
		expect(got.status).toBe(200);
		expect(got.headers.get('content-type')).toBe('application/pdf');
		expect(got.headers.get('content-disposition')).toBe(`attachment; filename="Ga-07 assay _.pdf"; filename*=UTF-8''Ga-07%20assay%20%C3%BC.pdf`);
		expect(Buffer.from(await got.arrayBuffer()).equals(Buffer.from(big))).toBe(true);
		expect((await fetch(`${server.baseUrl}/api/v1/documents/${docId}`)).status).toBe(401);

		expect((await call('technician', 'DELETE', `/api/v1/documents/${docId}`)).status).toBe(403);
		expect((await call('supervisor', 'DELETE', `/api/v1/documents/${docId}`)).status).toBe(204);
		expect((await call('technician', 'GET', `/api/v1/documents/${docId}`)).status).toBe(404);
		const audit = db.prepare(`select action from audit_log where object_type = 'cell' and object_id = ? order by id`).all(String(cellId)) as { action: string }[];
		expect(audit.map((a) => a.action)).toEqual(['document.attach', 'document.delete']);
	});
});

describe('R_TPW check form action', () => {
	const post = (role: string, thermometerId: number, form: Record<string, string>) =>
		fetch(`${server.baseUrl}/thermometers/${thermometerId}?/addCheck`, {
			method: 'POST',
			redirect: 'manual',
			headers: { cookie: cookies[role] ?? '', origin: server.baseUrl, accept: 'application/json', 'content-type': 'application/x-www-form-urlencoded', 'x-sveltekit-action': 'true' },
			body: new URLSearchParams(form)
		});
	const count = (id: number) => (db.prepare('select count(*) as n from thermometer_rtpw where thermometer_id = ?').get(id) as { n: number }).n;

	it('refuses a technician and bad input, and audits a check an engineer adds', async () => {
		const id = ids.thermometerIds['KV-S-5182'];
		const before = count(id);
		expect((await post('technician', id, { measuredAt: '2026-11-30T09:15', rTpwOhm: '25.5019', currentMilliAmpere: '1', note: '' })).status).toBe(403);
		const bad = await post('engineer', id, { measuredAt: '30/11/2026', rTpwOhm: '-1', currentMilliAmpere: '', note: '' });
		expect(((await bad.json()) as { type: string; status: number }).status).toBe(400);
		expect(count(id)).toBe(before);
		const ok = await post('engineer', id, { measuredAt: '2026-11-30T09:15', rTpwOhm: '25.5019', currentMilliAmpere: '', note: 'bench 1' });
		expect(((await ok.json()) as { type: string }).type).toBe('success');
		expect(count(id)).toBe(before + 1);
		const row = db.prepare('select measured_at, r_tpw_ohm, current_ma, note from thermometer_rtpw where thermometer_id = ? order by id desc limit 1').get(id);
		// 2026-11-30T09:15Z = 2026-01-01 (1 767 225 600 s) + 333 days (Jan–Oct 304, + 29) + 9 h 15 min.
		expect(row).toEqual({ measured_at: (1_767_225_600 + 333 * 86_400 + 9 * 3600 + 15 * 60) * 1000, r_tpw_ohm: 25.5019, current_ma: null, note: 'bench 1' });
		const audit = db.prepare(`select action from audit_log where object_type = 'thermometer' and object_id = ? order by id desc limit 1`).get(String(id));
		expect(audit).toEqual({ action: 'thermometer.rtpw.add' });
	});
});
