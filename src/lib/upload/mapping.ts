// Column mapping and row validation for a bridge log uploaded as a past run. Pure and shared: the
// browser uses it for the preview, the server for every row of the file.
import { z } from 'zod';

export const TIME_UNITS = ['iso', 'epoch-s', 'epoch-ms'] as const;
export type TimeUnit = (typeof TIME_UNITS)[number];
export const CURRENT_UNITS = ['mA', 'A'] as const;
export type CurrentUnit = (typeof CURRENT_UNITS)[number];
export const FIELDS = ['time', 'ratio', 'current', 'channel', 'seq'] as const;
export type Field = (typeof FIELDS)[number];

/** Plausible ranges: outside them a value is almost surely a mapping or unit mistake. */
export const RATIO_MAX = 100;
export const CURRENT_MAX_MILLIAMPERE = 50;
export const CHANNEL_MAX = 63;

// 'UTC', 'Z' or a fixed offset ±HH:MM. Named zones (Europe/Rome) would need @date-fns/tz, not installed.
const OFFSET = /^(?:UTC|Z|[+-](?:0\d|1[0-4]):[0-5]\d)$/;

export const mappingSchema = z
	.object({
		delimiter: z.enum([',', '\t', ';']),
		headerRow: z.boolean(),
		/** 0-based column index of each field; channel and seq may be absent. */
		columns: z.object({
			time: z.number().int().min(0).max(999),
			ratio: z.number().int().min(0).max(999),
			current: z.number().int().min(0).max(999),
			channel: z.number().int().min(0).max(999).nullable(),
			seq: z.number().int().min(0).max(999).nullable()
		}),
		timeUnit: z.enum(TIME_UNITS),
		/** For ISO text without its own offset: the zone the instrument clock wrote in. */
		timeZone: z.string().regex(OFFSET, 'Use UTC or a fixed offset such as +01:00'),
		currentUnit: z.enum(CURRENT_UNITS),
		/** Channel of every row when the file has no channel column. */
		channelDefault: z.number().int().min(0).max(CHANNEL_MAX)
	})
	.refine((m) => new Set(Object.values(m.columns).filter((c) => c !== null)).size === Object.values(m.columns).filter((c) => c !== null).length, {
		message: 'Each column may be mapped to one field only',
		path: ['columns']
	});
export type ColumnMapping = z.infer<typeof mappingSchema>;

export interface ParsedReading {
	/** From the file's seq column, or null (the server numbers rows in file order). */
	seq: number | null;
	timeMs: number;
	ratio: number;
	currentMilliAmpere: number;
	channel: number;
}

export interface RowProblem {
	/** Line of the file, 1 = first line (the header, when there is one). */
	line: number;
	field: Field | 'row';
	reason: string;
}

export type RowResult = { ok: true; reading: ParsedReading } | { ok: false; problems: RowProblem[] };

function offsetMinutes(zone: string): number {
	if (zone === 'UTC' || zone === 'Z') return 0;
	const sign = zone[0] === '-' ? -1 : 1;
	return sign * (Number(zone.slice(1, 3)) * 60 + Number(zone.slice(4, 6)));
}

// 2026-03-04T05:06:07.123+01:00, with ' ' for 'T', seconds and fraction optional, offset optional.
const ISO = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?\s*(Z|[+-]\d{2}:?\d{2})?$/i;
const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** UTC milliseconds from a time cell, or a reason it cannot be read. */
export function parseTimeMs(text: string, unit: TimeUnit, zone: string): { ok: true; ms: number } | { ok: false; reason: string } {
	const t = text.trim();
	if (t === '') return { ok: false, reason: 'empty' };
	if (unit !== 'iso') {
		if (!NUMBER.test(t)) return { ok: false, reason: `not a number of ${unit === 'epoch-s' ? 'seconds' : 'milliseconds'} since 1970` };
		const ms = Math.round(Number(t) * (unit === 'epoch-s' ? 1000 : 1));
		// 1970..2200: a value outside is a unit mistake (seconds read as milliseconds or the reverse).
		if (ms <= 0 || ms > 7_258_118_400_000) return { ok: false, reason: 'outside 1970–2200: check the time unit' };
		return { ok: true, ms };
	}
	const m = ISO.exec(t);
	if (!m) return { ok: false, reason: 'not an ISO date and time (YYYY-MM-DD hh:mm[:ss[.fff]][offset])' };
	const [, y, mo, d, h, mi, s = '0', frac = '', off] = m;
	const month = Number(mo);
	const day = Number(d);
	if (month < 1 || month > 12 || day < 1 || day > 31 || Number(h) > 23 || Number(mi) > 59 || Number(s) > 59) return { ok: false, reason: 'date or time field out of range' };
	const fracMs = frac ? Math.round(Number(`0.${frac}`) * 1000) : 0;
	const local = Date.UTC(Number(y), month - 1, day, Number(h), Number(mi), Number(s)) + fracMs;
	// Date.UTC rolls 31 February over into March: refuse instead of guessing.
	if (new Date(local - fracMs).getUTCDate() !== day) return { ok: false, reason: 'no such day in that month' };
	const zoneText = off ? (off.toUpperCase() === 'Z' ? 'Z' : off.includes(':') ? off : `${off.slice(0, 3)}:${off.slice(3)}`) : zone;
	if (!OFFSET.test(zoneText)) return { ok: false, reason: `offset ${zoneText} out of range` };
	return { ok: true, ms: local - offsetMinutes(zoneText) * 60_000 };
}

function cell(fields: readonly string[], index: number | null): string | undefined {
	return index === null ? undefined : fields[index];
}

/** Validates one data row against the mapping; every problem of the row is listed. */
export function validateRow(fields: readonly string[], mapping: ColumnMapping, line: number): RowResult {
	const problems: RowProblem[] = [];
	const c = mapping.columns;
	const need = Math.max(c.time, c.ratio, c.current, c.channel ?? 0, c.seq ?? 0) + 1;
	if (fields.length < need) return { ok: false, problems: [{ line, field: 'row', reason: `${fields.length} column${fields.length === 1 ? '' : 's'}, the mapping needs ${need}` }] };

	const time = parseTimeMs(cell(fields, c.time)!, mapping.timeUnit, mapping.timeZone);
	if (!time.ok) problems.push({ line, field: 'time', reason: time.reason });

	const number = (field: Field, text: string | undefined): number | null => {
		const t = (text ?? '').trim();
		if (t === '') return problems.push({ line, field, reason: 'empty' }), null;
		if (!NUMBER.test(t)) return problems.push({ line, field, reason: `not a number: “${t.slice(0, 24)}”` }), null;
		return Number(t);
	};

	const ratio = number('ratio', cell(fields, c.ratio));
	if (ratio !== null && !(ratio > 0 && ratio <= RATIO_MAX)) problems.push({ line, field: 'ratio', reason: `ratio ${ratio} outside (0, ${RATIO_MAX}]` });

	const rawCurrent = number('current', cell(fields, c.current));
	const currentMilliAmpere = rawCurrent === null ? null : mapping.currentUnit === 'A' ? rawCurrent * 1000 : rawCurrent;
	if (currentMilliAmpere !== null && !(currentMilliAmpere > 0 && currentMilliAmpere <= CURRENT_MAX_MILLIAMPERE)) {
		problems.push({ line, field: 'current', reason: `current ${currentMilliAmpere} mA outside (0, ${CURRENT_MAX_MILLIAMPERE}] mA: check the unit` });
	}

	let channel: number | null = mapping.channelDefault;
	if (c.channel !== null) {
		channel = number('channel', cell(fields, c.channel));
		if (channel !== null && !(Number.isInteger(channel) && channel >= 0 && channel <= CHANNEL_MAX)) {
			problems.push({ line, field: 'channel', reason: `channel must be a whole number 0–${CHANNEL_MAX}` });
			channel = null;
		}
	}

	let seq: number | null = null;
	if (c.seq !== null) {
		seq = number('seq', cell(fields, c.seq));
		if (seq !== null && !(Number.isSafeInteger(seq) && seq >= 0)) {
			problems.push({ line, field: 'seq', reason: 'seq must be a whole number ≥ 0' });
			seq = null;
		}
	}

	if (problems.length > 0 || !time.ok || ratio === null || currentMilliAmpere === null || channel === null) return { ok: false, problems };
	return { ok: true, reading: { seq, timeMs: time.ms, ratio, currentMilliAmpere, channel } };
}

/** A blank line or a comment line (# …) is skipped, not an error. */
export function isSkippableRow(fields: readonly string[]): boolean {
	if (fields.length === 0) return true;
	if (fields.length === 1 && fields[0].trim() === '') return true;
	return fields[0].trimStart().startsWith('#');
}

/** A first guess at the mapping from the header names (the person confirms or changes it). */
export function guessColumns(header: readonly string[]): ColumnMapping['columns'] {
	const find = (re: RegExp, taken: Set<number>) => {
		const i = header.findIndex((h, idx) => !taken.has(idx) && re.test(h.trim().toLowerCase()));
		if (i >= 0) taken.add(i);
		return i >= 0 ? i : null;
	};
	const taken = new Set<number>();
	const seq = find(/^(seq|sequence|n|no|index|#)$/, taken);
	const time = find(/time|date|stamp|utc/, taken);
	const ratio = find(/ratio|^r\/rs|^rx\/rs/, taken);
	const current = find(/current|^i\b|\bma\b|amp/, taken);
	const channel = find(/chan|^ch$/, taken);
	const next = () => {
		for (let i = 0; i < header.length; i++) if (!taken.has(i)) return taken.add(i), i;
		return 0;
	};
	return { time: time ?? next(), ratio: ratio ?? next(), current: current ?? next(), channel, seq };
}

/** A first guess at the time unit from a sample cell. */
export function guessTimeUnit(sample: string): TimeUnit {
	const t = sample.trim();
	if (!NUMBER.test(t)) return 'iso';
	return Number(t) > 1e11 ? 'epoch-ms' : 'epoch-s';
}

/** What the server says about one upload (GET /api/v1/uploads/{id}); shared by the server and the page. */
export interface UploadStatus {
	id: string;
	purpose: string;
	state: string;
	filename: string;
	sizeBytes: number;
	receivedBytes: number;
	parsedBytes: number;
	goodRows: number;
	badRows: number;
	firstTimeMs: number | null;
	lastTimeMs: number | null;
	message: string;
	runId: number | null;
	mapping: ColumnMapping | null;
	problems: { line: number; field: string; reason: string }[];
	/** Problems beyond those listed (each bad row is counted in badRows). */
	problemsListed: number;
}
