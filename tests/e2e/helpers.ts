import { expect, type Page } from '@playwright/test';
import { DEMO_USERS } from '../../src/lib/server/demo/scenario';
import type { Role } from '../../src/lib/server/auth/types';

export function demoUser(role: Role) {
	const user = DEMO_USERS.find((u) => u.role === role);
	if (!user) throw new Error(`no demo user with role ${role}`);
	return user;
}

export async function signInAs(page: Page, role: Role): Promise<void> {
	const user = demoUser(role);
	await page.goto('/sign-in');
	await page.getByLabel('E-mail').fill(user.email);
	await page.getByLabel('Password').fill(user.password);
	await page.getByRole('button', { name: 'Sign in' }).click();
	await expect(page.getByTestId('role-badge')).toHaveText(role);
}

/** Screenshots go to test-artifacts/screens so a person can look at every screen after a run. */
export async function screenshot(page: Page, name: string): Promise<void> {
	await page.screenshot({ path: `test-artifacts/screens/${name}.png`, fullPage: true });
}

export async function setTheme(page: Page, theme: 'light' | 'dark'): Promise<void> {
	await page.evaluate((t) => {
		localStorage.setItem('stillpoint-theme', t);
		document.documentElement.dataset.theme = t;
	}, theme);
}
