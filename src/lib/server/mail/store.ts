// The fake SMTP server's message store: one JSON object per line, appended as messages arrive.
// Read by /admin/mail and by the tests; written only by fake-server.ts.

import { existsSync, readFileSync } from 'node:fs';

export interface StoredMail {
	id: string;
	receivedAtMs: number;
	envelopeFrom: string;
	envelopeTo: string[];
	from: string;
	to: string[];
	subject: string;
	text: string;
	messageId: string | null;
}

export function readMailStore(path: string | null, opts: { limit?: number } = {}): StoredMail[] {
	if (!path || !existsSync(path)) return [];
	const out: StoredMail[] = [];
	for (const line of readFileSync(path, 'utf8').split('\n')) {
		if (!line.trim()) continue;
		try {
			out.push(JSON.parse(line) as StoredMail);
		} catch {
			/* a line being written right now */
		}
	}
	out.reverse();
	return opts.limit ? out.slice(0, opts.limit) : out;
}
