// A local SMTP server for development, tests and the demo: accepts every message on loopback, parses
// it and appends it to a JSONL store that /admin/mail reads. Never for production: no TLS, no auth.
// Imported by scripts/demo.ts and the tests only (not by the app), so the app bundle stays without it.

import { appendFileSync, mkdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { randomUUID } from 'node:crypto';
import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import type { StoredMail } from './store';

export interface FakeMailServer {
	port: number;
	store: string;
	/** messages received by this instance, oldest first */
	received: StoredMail[];
	/** resolves once `count` messages have arrived (or rejects after timeoutMs) */
	waitFor(count: number, timeoutMs?: number): Promise<StoredMail[]>;
	close(): Promise<void>;
}

const addresses = (a: AddressObject | AddressObject[] | undefined): string[] =>
	(Array.isArray(a) ? a : a ? [a] : []).flatMap((x) => x.value.map((v) => v.address ?? '')).filter(Boolean);

export async function startFakeMailServer(opts: { port?: number; host?: string; store: string; log?: (m: string) => void }): Promise<FakeMailServer> {
	mkdirSync(dirname(opts.store), { recursive: true });
	const received: StoredMail[] = [];
	const waiters = new Set<() => void>();
	const server = new SMTPServer({
		authOptional: true,
		disabledCommands: ['STARTTLS', 'AUTH'],
		logger: false,
		size: 5 * 1024 * 1024,
		onData(stream, session, callback) {
			simpleParser(stream)
				.then((parsed) => {
					const mail: StoredMail = {
						id: randomUUID(),
						receivedAtMs: Date.now(),
						envelopeFrom: session.envelope.mailFrom ? session.envelope.mailFrom.address : '',
						envelopeTo: session.envelope.rcptTo.map((r) => r.address),
						from: addresses(parsed.from).join(', '),
						to: addresses(parsed.to),
						subject: parsed.subject ?? '',
						text: parsed.text ?? '',
						messageId: parsed.messageId ?? null
					};
					appendFileSync(opts.store, JSON.stringify(mail) + '\n');
					received.push(mail);
					opts.log?.(`fake mail: "${mail.subject}" to ${mail.envelopeTo.join(', ')}`);
					for (const w of waiters) w();
					callback();
				})
				.catch((e: Error) => callback(e));
		}
	});
	const host = opts.host ?? '127.0.0.1';
	await new Promise<void>((ok, fail) => {
		server.once('error', fail);
		server.listen(opts.port ?? 0, host, () => ok());
	});
	server.on('error', (e) => opts.log?.(`fake mail server: ${e.message}`));
	const address = server.server.address();
	const port = typeof address === 'object' && address ? address.port : (opts.port ?? 0);
	return {
		port,
		store: opts.store,
		received,
		waitFor(count, timeoutMs = 30_000) {
			return new Promise((resolve, reject) => {
				const check = () => {
					if (received.length >= count) {
						waiters.delete(check);
						clearTimeout(timer);
						resolve(received.slice());
					}
				};
				const timer = setTimeout(() => {
					waiters.delete(check);
					reject(new Error(`expected ${count} messages at the fake SMTP server, got ${received.length}`));
				}, timeoutMs);
				waiters.add(check);
				check();
			});
		},
		close: () => new Promise<void>((ok) => server.close(() => ok()))
	};
}
