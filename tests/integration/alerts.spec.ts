// Alerts against the real server: a simulated drift streamed in over HTTP fires the drift rule, one
// e-mail reaches the local fake SMTP server, the acknowledgement and the clearing land in the audit
// trail; a silent instrument fires the silence rule; a flapping condition stays one alert; a technician
// can neither change rules nor sign a run off; a signed run is locked and reopens as a new revision.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { transitionRun } from '../../src/lib/server/repositories/run-lifecycle';
import { alertFixture, driftReadings, postReadings, waitUntil, type AlertFixture } from './alerts-fixture';
import type { AlertSummary } from '../../src/lib/live/protocol';

let f: AlertFixture;
let supervisor: string;
let technician: string;
let engineer: string;
beforeAll(async () => {
	f = await alertFixture();
	[supervisor, technician, engineer] = await Promise.all([f.cookie('supervisor'), f.cookie('technician'), f.cookie('engineer')]);
}, 60_000);
afterAll(async () => {
	await f?.close();
});

const api = async (path: string, cookie: string, init: RequestInit = {}) => {
	const res = await fetch(f.server.baseUrl + path, { ...init, redirect: 'manual', headers: { cookie, origin: f.server.baseUrl, 'content-type': 'application/json', ...(init.headers ?? {}) } });
	const text = await res.text();
	let body: any = text;
	try {
		body = JSON.parse(text);
	} catch {
		/* not JSON */
	}
	return { status: res.status, body };
};
const alertsOf = async (runId: number, state = 'all'): Promise<AlertSummary[]> => ((await api(`/api/v1/alerts?state=${state}`, supervisor)).body.alerts as AlertSummary[]).filter((a) => a.runId === String(runId));
const form = (path: string, cookie: string, fields: Record<string, string>) =>
	fetch(f.server.baseUrl + path, { method: 'POST', redirect: 'manual', headers: { cookie, origin: f.server.baseUrl, 'content-type': 'application/x-www-form-urlencoded', accept: 'application/json', 'x-sveltekit-action': 'true' }, body: new URLSearchParams(fields) });

describe('drift: zn-freeze-drift streamed into the server', () => {
	let runId: number;
	let token: string;
	let alert: AlertSummary;
	let rest: ReturnType<typeof driftReadings>['readings'] = [];
	it('fires the drift rule within the window after furnace control is lost, and sends exactly one e-mail', async () => {
		const run = await f.zincRun({ driftMilliKelvinPerHour: 0.5, bandMilliKelvin: 10, silenceSeconds: 600 });
		runId = run.runId;
		token = run.token;
		const { readings, lostMs } = driftReadings();
		const cut = readings.findIndex((r) => r.timeMs > lostMs + 20 * 60_000);
		rest = readings.slice(cut);
		await postReadings(f.server.baseUrl, runId, run.token, readings.slice(0, cut));
		alert = await waitUntil('the drift alert', async () => (await alertsOf(runId)).find((a) => a.kind === 'drift'));
		expect(alert).toMatchObject({ state: 'raised', unit: 'mK/h', limitValue: 0.5, occurrences: 1, benchName: 'Bench 3 · zinc', fixedPoint: 'Zn' });
		expect(Math.abs(alert.value!)).toBeGreaterThan(0.5);
		const [mail] = await f.mail.waitFor(1);
		expect(mail.subject).toBe(`[Stillpoint] Plateau drift — Bench 3 · zinc, run #${runId}`);
		expect(mail.envelopeTo.sort()).toEqual(['ruth.adeyemi@kestrelvale.example', 'tomas.varga@kestrelvale.example']);
		expect(mail.text).toContain(`Run:        #${runId} (Zn) on Bench 3 · zinc`);
		expect(mail.text).toMatch(/Value: {6}-?\d+\.\d+ mK\/h/);
		expect(mail.text).toContain('Limit:      0.500 mK/h');
		expect(mail.text).toContain(`http://stillpoint.kestrelvale.example/alerts?alert=${alert.id}`);
		await waitUntil('delivery marked sent', async () => (await alertsOf(runId)).find((a) => a.id === alert.id && a.delivery === 'sent'));
	}, 90_000);

	it('a supervisor acknowledges it with a comment; an engineer may not', async () => {
		expect((await api(`/api/v1/alerts/${alert.id}/acknowledge`, engineer, { method: 'POST', body: JSON.stringify({ comment: 'not mine' }) })).status).toBe(403);
		expect((await api(`/api/v1/alerts/${alert.id}/acknowledge`, supervisor, { method: 'POST', body: JSON.stringify({ comment: '' }) })).status).toBe(422);
		const ok = await api(`/api/v1/alerts/${alert.id}/acknowledge`, supervisor, { method: 'POST', body: JSON.stringify({ comment: 'Furnace controller checked, watching the slope' }) });
		expect(ok.status).toBe(200);
		expect(ok.body.alert).toMatchObject({ state: 'noted', ackComment: 'Furnace controller checked, watching the slope', acknowledgedBy: 'Ruth Adeyemi' });
		expect((await api(`/api/v1/alerts/${alert.id}/acknowledge`, supervisor, { method: 'POST', body: JSON.stringify({ comment: 'again' }) })).status).toBe(409);
	});

	it('the condition clears (hysteresis) and the alert clears by itself; still one e-mail; the audit trail has each step', async () => {
		await postReadings(f.server.baseUrl, runId, token, rest);
		const cleared = await waitUntil('the drift alert to clear', async () => (await alertsOf(runId)).find((a) => a.id === alert.id && a.state === 'cleared'));
		expect(cleared).toMatchObject({ resolvedBy: null, occurrences: 1, ackComment: 'Furnace controller checked, watching the slope' });
		await new Promise((r) => setTimeout(r, 1500));
		expect(f.mail.received.filter((m) => m.subject.includes(`run #${runId}`)).length).toBe(1);
		const audit = await f.db.selectFrom('audit_log').select(['action', 'actor_label']).where('object_type', '=', 'alert').where('object_id', '=', alert.id).orderBy('id').execute();
		expect(audit.map((a) => a.action)).toEqual(['alert.raise', 'alert.acknowledge', 'alert.clear']);
		expect(audit[1].actor_label).toContain('ruth.adeyemi@kestrelvale.example');
	}, 90_000);
});

describe('silence and flapping', () => {
	it('a silent instrument fires the silence rule; readings coming and going make one alert, reopened, with its occurrences counted', async () => {
		const before = f.mail.received.length;
		const run = await f.zincRun({ driftMilliKelvinPerHour: 0.5, bandMilliKelvin: 10, silenceSeconds: 2 });
		const { readings } = driftReadings(0.2);
		await postReadings(f.server.baseUrl, run.runId, run.token, readings.slice(0, 10));
		const first = await waitUntil('the silence alert', async () => (await alertsOf(run.runId)).find((a) => a.kind === 'silence' && a.state === 'raised'), 15_000);
		expect(first).toMatchObject({ unit: 's', limitValue: 2, occurrences: 1 });
		expect(first.value!).toBeGreaterThan(2);
		for (let round = 0; round < 2; round++) {
			await postReadings(f.server.baseUrl, run.runId, run.token, readings.slice(10 + round * 5, 15 + round * 5));
			await waitUntil('silence to clear', async () => (await alertsOf(run.runId)).find((a) => a.id === first.id && a.state === 'cleared'), 10_000);
			await waitUntil('silence to come back', async () => (await alertsOf(run.runId)).find((a) => a.id === first.id && a.state === 'raised'), 15_000);
		}
		const all = await alertsOf(run.runId);
		expect(all.filter((a) => a.kind === 'silence').map((a) => ({ id: a.id, occurrences: a.occurrences }))).toEqual([{ id: first.id, occurrences: 3 }]);
		await f.mail.waitFor(before + 1);
		await new Promise((r) => setTimeout(r, 1000));
		expect(f.mail.received.slice(before).filter((m) => m.subject.includes(`run #${run.runId}`)).map((m) => m.subject)).toEqual([`[Stillpoint] Instrument silent — Bench 3 · zinc, run #${run.runId}`]);
		const audit = await f.db.selectFrom('audit_log').select('action').where('object_type', '=', 'alert').where('object_id', '=', first.id).orderBy('id').execute();
		expect(audit.map((a) => a.action)).toEqual(['alert.raise', 'alert.clear', 'alert.reopen', 'alert.clear', 'alert.reopen']);
		// the run stops recording: nothing is silent any more
		await transitionRun(f.db, f.people.technician, run.runId, 'finish');
		await waitUntil('silence cleared at finish', async () => (await alertsOf(run.runId)).find((a) => a.id === first.id && a.state === 'cleared'), 10_000);
	}, 90_000);
});

describe('who may change rules and sign runs off', () => {
	it('a technician gets 403 on the rules (API and page) and on the review page and its actions', async () => {
		const rule = { kind: 'drift', fixedPoint: 'Zn', enabled: true, params: { limitMilliKelvinPerHour: 0.4 } };
		expect((await api('/api/v1/alerts/rules', technician, { method: 'PUT', body: JSON.stringify(rule) })).status).toBe(403);
		expect((await api('/api/v1/alerts/rules', engineer, { method: 'PUT', body: JSON.stringify(rule) })).status).toBe(403);
		expect((await form('/alerts/rules?/save', technician, { kind: 'drift', fixedPoint: 'Zn', enabled: 'on', 'p.limitMilliKelvinPerHour': '0.4' })).status).toBe(403);
		expect((await api('/alerts/rules', technician, { headers: { accept: 'text/html' } })).status).toBe(403);
		const run = await f.db.selectFrom('run').select('id').where('state', '=', 'finished').orderBy('id', 'desc').executeTakeFirstOrThrow();
		expect((await api(`/runs/${run.id}/review`, technician, { headers: { accept: 'text/html' } })).status).toBe(403);
		expect((await form(`/runs/${run.id}/review?/sign`, technician, { comment: 'ok' })).status).toBe(403);
		expect((await f.db.selectFrom('run').select('review_state').where('id', '=', run.id).executeTakeFirstOrThrow()).review_state).toBe('unreviewed');
		expect((await f.db.selectFrom('alert_rule').selectAll().execute()).length).toBe(0);
	});

	it('a supervisor saves a rule (audited) and it is listed', async () => {
		const ok = await api('/api/v1/alerts/rules', supervisor, { method: 'PUT', body: JSON.stringify({ kind: 'drift', fixedPoint: 'Zn', enabled: true, params: { limitMilliKelvinPerHour: 0.4, k: 2.5 } }) });
		expect(ok.status).toBe(200);
		const bad = await api('/api/v1/alerts/rules', supervisor, { method: 'PUT', body: JSON.stringify({ kind: 'drift', fixedPoint: 'Zn', enabled: true, params: { limitMilliKelvinPerHour: -1 } }) });
		expect(bad.status).toBe(422);
		const list = await api('/api/v1/alerts/rules', engineer);
		expect(list.body.rules).toEqual([{ id: ok.body.id, kind: 'drift', fixedPoint: 'Zn', runId: null, params: { limitMilliKelvinPerHour: 0.4, k: 2.5 }, enabled: true }]);
		const audit = await f.db.selectFrom('audit_log').select(['action', 'summary']).where('object_type', '=', 'rule').execute();
		expect(audit).toEqual([{ action: 'rule.create', summary: 'Plateau drift for Zn: on, limitMilliKelvinPerHour 0.4, k 2.5' }]);
	});

	it('a supervisor signs a finished run off; it is then locked; reopening makes revision 2 and keeps the signed record', async () => {
		const run = await f.db.selectFrom('run').select('id').where('state', '=', 'finished').orderBy('id', 'desc').executeTakeFirstOrThrow();
		// the drift run's alert is cleared, the silence run's too: nothing waits for acknowledgement
		const signed = await form(`/runs/${run.id}/review?/sign`, supervisor, { comment: 'Plateau fine after the furnace check' });
		expect(await signed.json()).toMatchObject({ type: 'success', status: 200 });
		expect(await f.db.selectFrom('run').select(['review_state', 'revision']).where('id', '=', run.id).executeTakeFirstOrThrow()).toEqual({ review_state: 'signed', revision: 1 });
		await expect(transitionRun(f.db, f.people.supervisor, run.id, 'reopen')).rejects.toThrow(/signed off and locked/);
		const event = await form(`/runs/${run.id}?/event`, technician, { kind: 'note', note: 'late note' });
		expect((await event.json()).type).toBe('failure');
		await expect(f.db.insertInto('run_event').values({ run_id: run.id, time_ms: 1, kind: 'note', note: 'behind the app', created_at: 1 }).execute()).rejects.toThrow(/locked/);
		expect(await (await form(`/runs/${run.id}/review?/revise`, supervisor, { comment: '' })).json()).toMatchObject({ type: 'failure', status: 400 });
		expect(await (await form(`/runs/${run.id}/review?/revise`, supervisor, { comment: 'Immersion depth was entered wrong' })).json()).toMatchObject({ type: 'success' });
		expect(await f.db.selectFrom('run').select(['review_state', 'revision', 'signed_by']).where('id', '=', run.id).executeTakeFirstOrThrow()).toEqual({ review_state: 'unreviewed', revision: 2, signed_by: null });
		const decisions = await f.db.selectFrom('run_review').select(['revision', 'decision', 'comment', 'snapshot_json']).where('run_id', '=', run.id).orderBy('id').execute();
		expect(decisions.map((d) => [d.revision, d.decision, d.comment])).toEqual([
			[1, 'signed', 'Plateau fine after the furnace check'],
			[2, 'revised', 'Immersion depth was entered wrong']
		]);
		expect(JSON.parse(decisions[0].snapshot_json).run).toMatchObject({ id: run.id, revision: 1 });
		await expect(f.db.updateTable('run_review').set({ comment: 'rewritten' }).execute()).rejects.toThrow(/append-only/);
		const audit = await f.db.selectFrom('audit_log').select('action').where('object_type', '=', 'run').where('object_id', '=', String(run.id)).orderBy('id').execute();
		expect(audit.map((a) => a.action).slice(-2)).toEqual(['run.sign', 'run.revise']);
	});
});
