// The e-mail outbox: alert mails are rows written in the same transaction as the alert, and this loop
// sends them over SMTP on its own timer, with retries and backoff. The ingest never waits for it.

import type SQLite from 'better-sqlite3';
import nodemailer, { type Transporter } from 'nodemailer';
import { MAX_DELIVERY_ATTEMPTS, retryDelayMs } from '../alerts/conditions';
import { mailSettings, type MailSettings } from './config';

interface DueRow {
	id: number;
	alert_id: number;
	recipients_json: string;
	subject: string;
	body_text: string;
	attempts: number;
}

export interface Outbox {
	/** one pass: sends what is due; resolves when those attempts are done */
	pump(nowMs?: number): Promise<void>;
	close(): void;
}

export function startOutbox(sqlite: SQLite.Database, opts: { intervalMs?: number; env?: NodeJS.ProcessEnv; onChange?: (alertId: number) => void } = {}): Outbox {
	const settings: MailSettings = mailSettings(opts.env);
	const transport: Transporter | null = settings.transport
		? nodemailer.createTransport(settings.transport as Parameters<typeof nodemailer.createTransport>[0], { from: settings.from })
		: null;
	const due = sqlite.prepare<[number], DueRow>("select id, alert_id, recipients_json, subject, body_text, attempts from alert_delivery where state = 'pending' and next_attempt_at <= ? order by id limit 20");
	const sent = sqlite.prepare("update alert_delivery set state = 'sent', attempts = attempts + 1, sent_at = ?, message_id = ?, last_error = null where id = ?");
	const retry = sqlite.prepare('update alert_delivery set attempts = ?, next_attempt_at = ?, last_error = ? where id = ?');
	const failed = sqlite.prepare("update alert_delivery set state = 'failed', attempts = ?, last_error = ? where id = ?");
	const inFlight = new Set<number>();
	let busy = false;

	const attempt = async (row: DueRow) => {
		const attempts = row.attempts + 1;
		try {
			if (!transport) throw new Error(`no SMTP relay configured: ${settings.describe}`);
			const info = await transport.sendMail({ from: settings.from, to: JSON.parse(row.recipients_json) as string[], subject: row.subject, text: row.body_text });
			sent.run(Date.now(), info.messageId ?? null, row.id);
		} catch (e) {
			const message = (e as Error).message.slice(0, 500);
			// Without a relay a retry cannot help: give up at once so the inbox says so.
			if (!transport || attempts >= MAX_DELIVERY_ATTEMPTS) failed.run(attempts, message, row.id);
			else retry.run(attempts, Date.now() + retryDelayMs(attempts), message, row.id);
		} finally {
			inFlight.delete(row.id);
			opts.onChange?.(row.alert_id);
		}
	};

	const pump = async (nowMs = Date.now()) => {
		if (busy) return;
		busy = true;
		try {
			const rows = due.all(nowMs).filter((r) => !inFlight.has(r.id));
			for (const r of rows) inFlight.add(r.id);
			await Promise.all(rows.map(attempt));
		} catch (e) {
			console.error('mail outbox', e);
		} finally {
			busy = false;
		}
	};
	const timer = setInterval(() => void pump(), opts.intervalMs ?? 1000);
	timer.unref();
	return {
		pump,
		close() {
			clearInterval(timer);
			transport?.close();
		}
	};
}
