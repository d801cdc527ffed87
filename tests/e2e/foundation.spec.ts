import { expect, test } from '@playwright/test';
import { demoUser, screenshot, setTheme, signInAs } from './helpers';

// What each role sees in the navigation (the product's access rules, stated here independently).
const AREAS_BY_ROLE = {
	technician: ['Benches', 'Runs', 'Cells', 'Thermometers', 'Calculations'],
	supervisor: ['Benches', 'Runs', 'Cells', 'Thermometers', 'Compare', 'Alerts', 'Calculations'],
	engineer: ['Benches', 'Runs', 'Cells', 'Thermometers', 'Compare', 'Alerts', 'Calculations'],
	admin: ['Benches', 'Runs', 'Cells', 'Thermometers', 'Compare', 'Alerts', 'Calculations', 'Admin']
} as const;

for (const role of ['technician', 'supervisor', 'engineer', 'admin'] as const) {
	test(`${role} signs in and sees the areas of that role`, async ({ page }) => {
		await signInAs(page, role);
		await expect(page).toHaveURL(/\/benches$/);
		const nav = page.getByRole('navigation', { name: 'Areas' });
		for (const label of AREAS_BY_ROLE[role]) await expect(nav.getByRole('link', { name: label, exact: true })).toBeVisible();
		const all = ['Benches', 'Runs', 'Cells', 'Thermometers', 'Compare', 'Alerts', 'Calculations', 'Admin'];
		for (const label of all.filter((l) => !(AREAS_BY_ROLE[role] as readonly string[]).includes(l))) {
			await expect(nav.getByRole('link', { name: label, exact: true })).toHaveCount(0);
		}
		await expect(page.getByTestId('bench-tile')).toHaveCount(5);
		await screenshot(page, `benches-${role}-light`);
	});
}

test('a technician who opens the admin area gets a 403 page that says why', async ({ page }) => {
	await signInAs(page, 'technician');
	const response = await page.goto('/admin/users');
	expect(response?.status()).toBe(403);
	await expect(page.getByTestId('error-page')).toContainText('Not for your role');
	await expect(page.getByTestId('error-page')).toContainText('technician');
	await screenshot(page, 'forbidden-technician');
});

test('a wrong password shows a clear error and gives no session', async ({ page, context }) => {
	const user = demoUser('engineer');
	await page.goto('/sign-in');
	await page.getByLabel('E-mail').fill(user.email);
	await page.getByLabel('Password').fill('definitely-wrong');
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page.getByTestId('sign-in-error')).toHaveText('That e-mail and password do not match an account.');
	const cookies = await context.cookies();
	expect(cookies.filter((c) => c.name.includes('session_token'))).toHaveLength(0);
	await page.goto('/benches');
	await expect(page).toHaveURL(/\/sign-in\?next=%2Fbenches/);
	await screenshot(page, 'sign-in-error');
});

test('the app renders with its shipped fonts and asks no other origin for anything', async ({ page, baseURL }) => {
	const foreign: string[] = [];
	const fonts: string[] = [];
	page.on('request', (req) => {
		const url = new URL(req.url());
		if (url.origin !== new URL(baseURL!).origin && !url.protocol.startsWith('data')) foreign.push(req.url());
		if (req.resourceType() === 'font') fonts.push(req.url());
	});
	await signInAs(page, 'engineer');
	await page.goto('/thermometers');
	await page.evaluate(() => document.fonts.ready);
	const loaded = await page.evaluate(() => [document.fonts.check('16px "JetBrains Mono"'), document.fonts.check('16px "Atkinson Hyperlegible"')]);
	expect(loaded).toEqual([true, true]);
	const numberFont = await page.locator('td.num').first().evaluate((el) => getComputedStyle(el).fontFamily);
	expect(numberFont).toContain('JetBrains Mono');
	expect(fonts.length).toBeGreaterThan(0);
	expect(foreign).toEqual([]);
});

test('the dark theme is kept across pages', async ({ page }) => {
	await signInAs(page, 'supervisor');
	await page.getByTestId('theme-toggle').click();
	await expect(page.locator('html')).toHaveAttribute('data-theme', 'dark');
	await page.goto('/cells');
	await expect(page.locator('html')).toHaveAttribute('data-theme', 'dark');
	await screenshot(page, 'cells-supervisor-dark');
	await setTheme(page, 'light');
});

test('an admin makes an account, changes its role, and the audit trail shows both', async ({ page }) => {
	await signInAs(page, 'admin');
	await page.goto('/admin/users');
	const form = page.getByTestId('new-user-form');
	await form.getByLabel('Full name').fill('Noor Hallam');
	await form.getByLabel('E-mail').fill('noor.hallam@kestrelvale.example');
	await form.getByLabel('Role').selectOption('technician');
	await form.getByLabel('First password').fill('first-pass-2026');
	await form.getByRole('button', { name: 'Make account' }).click();
	await expect(page.getByRole('status')).toContainText('noor.hallam@kestrelvale.example');
	const row = page.getByTestId('user-row').filter({ hasText: 'Noor Hallam' });
	await row.getByLabel('Role of Noor Hallam').selectOption('engineer');
	await row.getByRole('button', { name: 'Set' }).click();
	await expect(page.getByRole('status')).toHaveText('Role changed.');
	await page.goto('/admin/audit?q=Noor');
	await expect(page.getByTestId('audit-table')).toContainText('Created Noor Hallam');
	await page.goto('/admin/audit?type=user');
	await expect(page.getByTestId('audit-table')).toContainText('Role set to engineer');
	await screenshot(page, 'admin-audit');
});
