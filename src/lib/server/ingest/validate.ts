// Validation of instrument readings (docs/ingest-protocol.md, "One reading"). Hand-written rather than
// a schema library because it runs for every reading on the hot path, and because the protocol wants
// one detail per bad field with the value as received.

import { MAX_ERROR_DETAILS, MAX_READINGS_PER_REQUEST } from './limits';

export interface ValidReading {
	seq: number;
	timeMs: number;
	ratio: number;
	currentMilliAmp: number;
	channel: number;
}

export interface FieldError {
	field: string;
	value: unknown;
	reason: string;
}

export interface ReadingError extends FieldError {
	index: number;
	seq: number | null;
}

const ALLOWED = new Set(['seq', 'timeMs', 'ratio', 'currentMilliAmp', 'channel', 'type']);
export const MAX_CURRENT_MILLIAMP = 50;
export const DEFAULT_CHANNEL = 1;

/** JSON can only carry finite numbers, but a value may be a string, null, huge or fractional. */
function shown(value: unknown): unknown {
	if (typeof value === 'string') return value.length > 64 ? `${value.slice(0, 64)}…` : value;
	if (value === undefined) return null;
	if (typeof value === 'object' && value !== null) return Array.isArray(value) ? '[array]' : '[object]';
	return value;
}

/** Checks one reading; pushes problems to `errors` and returns the clean reading or null. */
export function checkReading(raw: unknown, errors: FieldError[]): ValidReading | null {
	if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) {
		errors.push({ field: '(reading)', value: shown(raw), reason: 'must be an object' });
		return null;
	}
	const r = raw as Record<string, unknown>;
	const before = errors.length;
	const { seq, timeMs, ratio, currentMilliAmp } = r;
	const channel = r.channel === undefined ? DEFAULT_CHANNEL : r.channel;
	if (typeof seq !== 'number' || !Number.isSafeInteger(seq) || seq < 0) errors.push({ field: 'seq', value: shown(seq), reason: 'must be an integer ≥ 0' });
	if (typeof timeMs !== 'number' || !Number.isSafeInteger(timeMs) || timeMs < 0) errors.push({ field: 'timeMs', value: shown(timeMs), reason: 'must be an integer ≥ 0 (UTC milliseconds)' });
	if (typeof ratio !== 'number' || !Number.isFinite(ratio) || ratio <= 0) errors.push({ field: 'ratio', value: shown(ratio), reason: 'must be a finite number > 0' });
	if (typeof currentMilliAmp !== 'number' || !Number.isFinite(currentMilliAmp) || currentMilliAmp <= 0 || currentMilliAmp > MAX_CURRENT_MILLIAMP) {
		errors.push({ field: 'currentMilliAmp', value: shown(currentMilliAmp), reason: `must be a finite number > 0 and ≤ ${MAX_CURRENT_MILLIAMP}` });
	}
	if (typeof channel !== 'number' || !Number.isInteger(channel) || channel < 0 || channel > 63) errors.push({ field: 'channel', value: shown(channel), reason: 'must be an integer 0–63' });
	// Unknown fields are refused so that a misspelt field (e.g. `current`) is not silently defaulted.
	// Fast path: count the keys; only when there are more than the known ones present, find which.
	let keys = 0;
	for (const _ in r) keys++;
	const known = +(seq !== undefined) + +(timeMs !== undefined) + +(ratio !== undefined) + +(currentMilliAmp !== undefined) + +(r.channel !== undefined) + +(r.type !== undefined);
	if (keys !== known) for (const key in r) if (!ALLOWED.has(key)) errors.push({ field: key, value: shown(r[key]), reason: 'is not a field of a reading' });
	if (errors.length > before) return null;
	// The parsed object itself when it holds exactly the five fields (the usual case; no copy per reading).
	if (keys === 5 && r.channel !== undefined) return r as unknown as ValidReading;
	return { seq: seq as number, timeMs: timeMs as number, ratio: ratio as number, currentMilliAmp: currentMilliAmp as number, channel: channel as number };
}

export type BatchResult =
	| { ok: true; readings: ValidReading[] }
	| { ok: false; status: 400 | 413 | 422; code: string; message: string; details?: unknown };

/** Validates a whole batch: every problem of every reading, or the clean readings. */
export function validateBatch(items: unknown[]): BatchResult {
	if (items.length > MAX_READINGS_PER_REQUEST) {
		return { ok: false, status: 413, code: 'too_many_readings', message: `At most ${MAX_READINGS_PER_REQUEST} readings per request; this one has ${items.length}.` };
	}
	const readings: ValidReading[] = new Array(items.length);
	const details: ReadingError[] = [];
	let bad = 0;
	const scratch: FieldError[] = [];
	for (let i = 0; i < items.length; i++) {
		scratch.length = 0;
		const r = checkReading(items[i], scratch);
		if (r) {
			readings[i] = r;
			continue;
		}
		bad++;
		const raw = items[i] as Record<string, unknown> | null;
		// The seq is echoed only when it is a usable one, so a client can find the reading by it.
		const seq = raw && typeof raw === 'object' && typeof raw.seq === 'number' && Number.isSafeInteger(raw.seq) && raw.seq >= 0 ? raw.seq : null;
		for (const e of scratch) if (details.length < MAX_ERROR_DETAILS) details.push({ index: i, seq, ...e });
	}
	if (bad > 0) {
		return { ok: false, status: 422, code: 'invalid_readings', message: `${bad} of ${items.length} readings are invalid; nothing was stored.${details.length >= MAX_ERROR_DETAILS ? ` The first ${MAX_ERROR_DETAILS} problems are listed.` : ''}`, details };
	}
	return { ok: true, readings };
}

/** Parses a request body: `{ "readings": [...] }` as JSON, or one reading per line as NDJSON. */
export function parseBatchBody(text: string, format: 'json' | 'ndjson'): BatchResult {
	if (format === 'json') {
		let body: unknown;
		try {
			body = JSON.parse(text);
		} catch (e) {
			return { ok: false, status: 400, code: 'invalid_json', message: `The body is not JSON: ${(e as Error).message}` };
		}
		if (body === null || typeof body !== 'object' || Array.isArray(body) || !Array.isArray((body as { readings?: unknown }).readings)) {
			return { ok: false, status: 400, code: 'invalid_body', message: 'The body must be an object { "readings": [ ... ] }.' };
		}
		return validateBatch((body as { readings: unknown[] }).readings);
	}
	const items: unknown[] = [];
	let line = 0;
	for (let start = 0; start <= text.length; ) {
		let end = text.indexOf('\n', start);
		if (end < 0) end = text.length;
		const s = text.slice(start, end).trim();
		line++;
		start = end + 1;
		if (s === '') continue;
		if (items.length >= MAX_READINGS_PER_REQUEST) {
			return { ok: false, status: 413, code: 'too_many_readings', message: `At most ${MAX_READINGS_PER_REQUEST} readings per request.` };
		}
		try {
			items.push(JSON.parse(s));
		} catch (e) {
			return { ok: false, status: 400, code: 'invalid_ndjson', message: `Line ${line} is not JSON: ${(e as Error).message}`, details: { line } };
		}
	}
	return validateBatch(items);
}
