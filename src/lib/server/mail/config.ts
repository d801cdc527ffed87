// Mail settings from the environment (docs/alerts.md): a real relay later, the local fake SMTP server
// in development, the tests and the demo.

import { dirname, join } from 'node:path';

export interface MailSettings {
	/** nodemailer transport options, or null when no relay is configured */
	transport: string | { host: string; port: number; secure: boolean; auth?: { user: string; pass: string }; ignoreTLS?: boolean } | null;
	from: string;
	/** base of the links in e-mails */
	publicUrl: string;
	/** the fake SMTP server's store (JSONL), read by /admin/mail */
	fakeStore: string | null;
	escalateAfterMinutes: number;
	/** describes the relay without its password, for the admin page */
	describe: string;
}

export function mailSettings(env: NodeJS.ProcessEnv = process.env): MailSettings {
	const from = env.STILLPOINT_MAIL_FROM || 'Stillpoint <stillpoint@localhost>';
	const publicUrl = env.STILLPOINT_PUBLIC_URL || env.ORIGIN || 'http://localhost:3000';
	const db = env.STILLPOINT_DB;
	const fakeStore = env.STILLPOINT_FAKE_MAIL_STORE || (db ? join(dirname(db), 'fake-mail.jsonl') : null);
	const escalateAfterMinutes = Number(env.STILLPOINT_ALERT_ESCALATE_MINUTES) > 0 ? Number(env.STILLPOINT_ALERT_ESCALATE_MINUTES) : 15;
	let transport: MailSettings['transport'] = null;
	let describe = 'no relay configured (set STILLPOINT_SMTP_URL or STILLPOINT_SMTP_HOST)';
	if (env.STILLPOINT_SMTP_URL) {
		transport = env.STILLPOINT_SMTP_URL;
		try {
			const u = new URL(env.STILLPOINT_SMTP_URL);
			describe = `${u.protocol}//${u.hostname}:${u.port || (u.protocol === 'smtps:' ? 465 : 587)}`;
		} catch {
			describe = 'STILLPOINT_SMTP_URL (unreadable)';
		}
	} else if (env.STILLPOINT_SMTP_HOST) {
		const port = Number(env.STILLPOINT_SMTP_PORT) || 587;
		const secure = env.STILLPOINT_SMTP_SECURE === 'true' || env.STILLPOINT_SMTP_SECURE === '1';
		transport = {
			host: env.STILLPOINT_SMTP_HOST,
			port,
			secure,
			...(env.STILLPOINT_SMTP_USER ? { auth: { user: env.STILLPOINT_SMTP_USER, pass: env.STILLPOINT_SMTP_PASS ?? '' } } : {})
		};
		describe = `${secure ? 'smtps' : 'smtp'}://${env.STILLPOINT_SMTP_HOST}:${port}`;
	}
	return { transport, from, publicUrl, fakeStore, escalateAfterMinutes, describe };
}
