import type SQLite from 'better-sqlite3';
import { loadReductionContext, reduceForLive } from '../ingest/reduce';

const HEADER = 'seq,time_utc,time_ms,bridge_ratio,current_mA,channel,resistance_ohm,W,T90_K,delta_from_assigned_mK,note\n';
const CHUNK_ROWS = 5_000;

function num(value: number | null, digits: number): string {
	return value === null || !Number.isFinite(value) ? '' : value.toFixed(digits);
}

function csvText(text: string): string {
	return /[",\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/**
 * A run's raw readings (exactly as stored: the ratio printed with all its digits) beside the values
 * reduced from them now, streamed in chunks so a 10^6-reading run never sits whole in memory.
 */
export function readingsCsvStream(sqlite: SQLite.Database, runId: number): ReadableStream<Uint8Array> | null {
	const ctx = loadReductionContext(sqlite, runId);
	if (!ctx) return null;
	const select = sqlite.prepare('select seq, time_ms, ratio, current_ma, channel from reading where run_id = ? and seq > ? order by seq limit ?');
	const encoder = new TextEncoder();
	let afterSeq = -1;
	let headerSent = false;
	return new ReadableStream<Uint8Array>({
		pull(controller) {
			if (!headerSent) {
				headerSent = true;
				const basis = ctx.basis === 'calibrated' ? `calibration ${ctx.subrange}` : ctx.basis === 'uncalibrated' ? 'no calibration: W_r = W' : `not reduced: ${ctx.problem}`;
				controller.enqueue(encoder.encode(`# Stillpoint run ${runId}, ${ctx.fixedPoint} ${ctx.kind}; reduced with ${basis}; delta after hydrostatic and pressure corrections\n${HEADER}`));
				return;
			}
			const rows = select.all(runId, afterSeq, CHUNK_ROWS) as { seq: number; time_ms: number; ratio: number; current_ma: number; channel: number }[];
			if (rows.length === 0) {
				controller.close();
				return;
			}
			let text = '';
			for (const r of rows) {
				const red = reduceForLive(ctx, { seq: r.seq, timeMs: r.time_ms, ratio: r.ratio, currentMilliAmp: r.current_ma, channel: r.channel }, false);
				text += `${r.seq},${new Date(r.time_ms).toISOString()},${r.time_ms},${r.ratio},${r.current_ma},${r.channel},${num(red.resistanceOhm, 7)},${num(red.w, 9)},${num(red.t90Kelvin, 6)},${num(red.deltaMilliKelvin, 4)},${red.problem ? csvText(red.problem) : ''}\n`;
			}
			afterSeq = rows[rows.length - 1].seq;
			controller.enqueue(encoder.encode(text));
		}
	});
}
