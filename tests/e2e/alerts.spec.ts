// The supervisor's side of an alert in Chromium: a simulated drift ('zn-freeze-drift') streamed into a
// real server (with the local fake SMTP server) raises the drift alert; exactly one e-mail arrives;
// the supervisor acknowledges it with a comment in the inbox; the condition clears and the alert
// clears by itself, live; the admin reads the mail; the supervisor reviews and signs the run off;
// the audit trail shows each step. Screenshots of the inbox and the review page, light and dark.
import { expect, test, type Page } from '@playwright/test';
import { transitionRun } from '../../src/lib/server/repositories/run-lifecycle';
import { alertFixture, driftReadings, postReadings, type AlertFixture } from '../integration/alerts-fixture';
import { demoUser, screenshot, setTheme } from './helpers';

let f: AlertFixture;
let run: { runId: number; token: string };
let rest: ReturnType<typeof driftReadings>['readings'];

test.beforeAll(async () => {
	f = await alertFixture();
	run = await f.zincRun({ driftMilliKelvinPerHour: 0.5, bandMilliKelvin: 10, silenceSeconds: 600 });
	const { readings, lostMs } = driftReadings();
	const cut = readings.findIndex((r) => r.timeMs > lostMs + 20 * 60_000);
	rest = readings.slice(cut);
	await postReadings(f.server.baseUrl, run.runId, run.token, readings.slice(0, cut));
});
test.afterAll(async () => {
	await f?.close();
});

async function signIn(page: Page, role: 'supervisor' | 'admin') {
	const u = demoUser(role);
	await page.goto(`${f.server.baseUrl}/sign-in`);
	await page.getByLabel('E-mail').fill(u.email);
	await page.getByLabel('Password').fill(u.password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page.getByTestId('role-badge')).toHaveText(role);
}

test('drift alert: raised, one e-mail, acknowledged with a comment, cleared by itself, run signed off, all in the audit trail', async ({ page, browser }) => {
	test.setTimeout(120_000);
	await signIn(page, 'supervisor');
	await page.goto(`${f.server.baseUrl}/alerts`);
	const card = page.locator('[data-kind="drift"]');
	await expect(card).toHaveAttribute('data-state', 'raised', { timeout: 30_000 });
	await expect(page.getByTestId('alert-badge')).toHaveText('1');
	await expect(card).toContainText(`Run #${run.runId}`);
	await expect(card.getByTestId('alert-value')).toContainText('mK/h');
	await expect(card.getByTestId('alert-delivery')).toHaveText('sent', { timeout: 10_000 });
	await expect(page.getByTestId('feed-state')).toContainText('live');
	await screenshot(page, 'alerts-inbox-light');
	await setTheme(page, 'dark');
	await screenshot(page, 'alerts-inbox-dark');
	await setTheme(page, 'light');

	const mails = await f.mail.waitFor(1);
	expect(mails.map((m) => m.subject)).toEqual([`[Stillpoint] Plateau drift — Bench 3 · zinc, run #${run.runId}`]);
	expect(mails[0].text).toContain('Limit:      0.500 mK/h');
	expect(mails[0].text).toContain(`/runs/${run.runId}`);

	await card.getByTestId('ack-input').fill('Furnace controller reset; watching the slope');
	await card.getByTestId('ack-button').click();
	await expect(card).toHaveAttribute('data-state', 'noted');
	await expect(card.getByTestId('ack-comment')).toContainText('Furnace controller reset; watching the slope');
	await expect(card.getByTestId('ack-comment')).toContainText('Ruth Adeyemi');

	// Control regained: the slope falls back inside the limit and the alert clears by itself, live.
	await postReadings(f.server.baseUrl, run.runId, run.token, rest);
	await expect(card).toHaveCount(0, { timeout: 30_000 });
	await page.goto(`${f.server.baseUrl}/alerts?view=all`);
	await expect(page.locator('[data-kind="drift"]')).toHaveAttribute('data-state', 'cleared');
	await expect(page.locator('[data-kind="drift"]')).toContainText('the condition went away');
	await expect(page.getByTestId('alert-badge')).toHaveCount(0);
	await page.waitForTimeout(1000);
	expect(f.mail.received.length).toBe(1);

	// The run ends; the supervisor reviews and signs it off.
	await transitionRun(f.db, f.people.technician, run.runId, 'finish');
	await page.goto(`${f.server.baseUrl}/runs/${run.runId}/review`);
	await expect(page.getByTestId('review-state')).toHaveText('Awaiting review');
	await expect(page.getByTestId('review-alerts')).toContainText('Plateau drift');
	await expect(page.getByTestId('review-alerts')).toContainText('Furnace controller reset');
	await expect(page.getByTestId('review-analysis')).toContainText('mK');
	await screenshot(page, 'run-review-light');
	await setTheme(page, 'dark');
	await screenshot(page, 'run-review-dark');
	await setTheme(page, 'light');
	await page.getByTestId('review-comment').fill('Plateau before the fault is usable; furnace fault noted');
	await page.getByTestId('sign-button').click();
	await expect(page.getByTestId('review-state')).toHaveText('Signed off');
	await expect(page.getByTestId('decisions')).toContainText('furnace fault noted');

	// The admin reads the mail and the audit trail.
	const admin = await browser.newPage();
	await signIn(admin, 'admin');
	await admin.goto(`${f.server.baseUrl}/admin/mail`);
	await expect(admin.getByTestId('mail-list')).toContainText(`Plateau drift — Bench 3 · zinc, run #${run.runId}`);
	await admin.getByTestId('mail-list').locator('summary').first().click();
	await expect(admin.getByTestId('mail-list')).toContainText('Acknowledge it:');
	await screenshot(admin, 'admin-mail-light');
	await admin.goto(`${f.server.baseUrl}/admin/audit?q=run+%23${run.runId}`);
	const audit = admin.getByTestId('audit-table');
	for (const action of ['alert.raise', 'alert.acknowledge', 'alert.clear', 'run.sign', 'run.finish']) await expect(audit).toContainText(action);
	await admin.close();
});
