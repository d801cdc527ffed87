// The alert engine: receives every ReducerUpdate of the ingest (the detector state and the reduced
// readings of each batch), keeps O(1)-per-reading conditions per recording run, and turns their edges
// into alert changes through the store. A tick on a timer handles what no reading can tell: silence,
// escalation, runs that stopped recording and R_TPW checks entered after a run. Instrument time (the
// readings' timeMs) drives drift, band and noise, so a replayed or sped-up run behaves as a live one;
// server time drives silence and escalation.

import type SQLite from 'better-sqlite3';
import type { AlertKind, AlertSummary } from '$lib/live/protocol';
import type { ReducerUpdate } from '../ingest/reducer';
import { CLEAR_FRACTION, DEFAULT_PARAMS, KIND_LABELS, parseRunLimits, resolveRule, type Resolved, type RuleParams, type RuleRow } from './params';
import { driftExcess, RollingMean, rtpwShiftMilliKelvin, SlopeWindow, Sustained } from './conditions';
import { AlertStore } from './store';

const TOUCH_INTERVAL_MS = 15_000;
const WATCH_REFRESH_MS = 60_000;
/** readings whose current differs from the plateau's first by more than this are self-heating checks */
const CURRENT_TOLERANCE = 0.02;
/** after a self-heating check the cell and thermometer relax for a while: those readings are left out */
const SETTLE_AFTER_CURRENT_CHANGE_S = 240;
/** a slope in the natural direction beyond this many drift limits: the melt or freeze settling or ending */
const NATURAL_END_FACTOR = 2;

export interface AlertPublisher {
	publishAlert(alert: AlertSummary): void;
}

interface RunWatch {
	runId: number;
	benchId: number;
	fixedPoint: string;
	loadedAtMs: number;
	rules: { [K in AlertKind]: Resolved<K> };
	fit: SlopeWindow;
	mean: RollingMean;
	baseCurrent: number | null;
	settleUntilS: number;
	/** +1: the end of this run moves the value up (melt), −1: down (freeze), 0: no natural direction */
	naturalSign: number;
	/** the curve has turned steeply in its natural direction: the melt or freeze is ending by itself */
	endingByItself: boolean;
	steepNatural: boolean;
	drift: Sustained;
	band: Sustained;
	noise: Sustained;
	silence: Sustained;
	wasPlateau: boolean;
	/** open alert id per kind that this engine raised or found open */
	reported: Partial<Record<AlertKind, number>>;
	lastTouchMs: Partial<Record<AlertKind, number>>;
	last: { slope: number | null; bandMean: number | null; noise: number | null };
}

interface RunRow {
	id: number;
	bench_id: number;
	kind: string;
	fixed_point: string;
	settings_json: string;
	state: string;
	started_at: number | null;
	created_at: number;
	last_reading_at: number | null;
}

export interface AlertEngineOptions {
	env?: NodeJS.ProcessEnv;
	tickMs?: number;
	publisher?: AlertPublisher | null;
	/** no timer (tests call tick themselves) */
	manual?: boolean;
}

export class AlertEngine {
	readonly store: AlertStore;
	private readonly watches = new Map<number, RunWatch>();
	private rules: RuleRow[] = [];
	private rulesVersion = '';
	private readonly timer: NodeJS.Timeout | null;
	private readonly stmts;
	private readonly env: NodeJS.ProcessEnv;

	constructor(
		readonly sqlite: SQLite.Database,
		private readonly opts: AlertEngineOptions = {}
	) {
		this.env = opts.env ?? process.env;
		this.store = new AlertStore(sqlite, this.env);
		const p = <T>(s: string) => sqlite.prepare<unknown[], T>(s);
		this.stmts = {
			run: p<RunRow>('select id, bench_id, kind, fixed_point, settings_json, state, started_at, created_at, last_reading_at from run where id = ?'),
			recording: p<RunRow>("select id, bench_id, kind, fixed_point, settings_json, state, started_at, created_at, last_reading_at from run where state = 'recording'"),
			rules: p<{ id: number; kind: AlertKind; fixed_point: string | null; run_id: number | null; params_json: string; enabled: number; updated_at: number }>('select id, kind, fixed_point, run_id, params_json, enabled, updated_at from alert_rule'),
			escalate: p<{ id: number }>("select id from alert_event where state = 'raised' and escalated_at is null and coalesce(reopened_at, raised_at) <= ?"),
			setting: p<{ value_json: string }>('select value_json from lab_setting where key = ?'),
			putSetting: p('insert into lab_setting (key, value_json) values (?, ?) on conflict (key) do update set value_json = excluded.value_json'),
			maxRtpw: p<{ id: number | null }>('select max(id) as id from thermometer_rtpw'),
			newRtpw: p<{ id: number; thermometer_id: number; measured_at: number }>('select id, thermometer_id, measured_at from thermometer_rtpw where id > ? order by id'),
			runBefore: p<{ id: number }>("select id from run where thermometer_id = ? and state = 'finished' and ended_at <= ? order by ended_at desc limit 1"),
			rtpwRun: p<{ id: number; thermometer_id: number; bench_id: number; fixed_point: string; settings_json: string; started_at: number | null; created_at: number; ended_at: number | null }>(
				'select id, thermometer_id, bench_id, fixed_point, settings_json, started_at, created_at, ended_at from run where id = ?'
			),
			rtpwBefore: p<{ r_tpw_ohm: number; measured_at: number }>('select r_tpw_ohm, measured_at from thermometer_rtpw where thermometer_id = ? and measured_at <= ? order by measured_at desc, id desc limit 1'),
			rtpwAfter: p<{ r_tpw_ohm: number; measured_at: number }>('select r_tpw_ohm, measured_at from thermometer_rtpw where thermometer_id = ? and measured_at >= ? order by measured_at asc, id asc limit 1'),
			anyByKey: p<{ id: number }>('select id from alert_event where dedupe_key = ? limit 1')
		};
		this.loadRules(true);
		this.timer = opts.manual ? null : setInterval(() => this.safeTick(), opts.tickMs ?? (Number(this.env.STILLPOINT_ALERT_TICK_MS) || 2000));
		this.timer?.unref();
	}

	close(): void {
		if (this.timer) clearInterval(this.timer);
	}

	/** From the ingest's update path: must stay cheap and never throw into it. */
	observe(u: ReducerUpdate): void {
		try {
			this.observeUnsafe(u);
		} catch (e) {
			console.error(`alerts: run ${u.runId}`, e);
		}
	}

	private safeTick(): void {
		try {
			this.tick();
		} catch (e) {
			console.error('alerts: tick failed', e);
		}
	}

	private observeUnsafe(u: ReducerUpdate): void {
		const w = this.watch(u.runId);
		if (!w) return;
		const d = u.summary.detector;
		const nowMs = Date.now();
		const onPlateau = d?.state === 'plateau';
		const c = u.columns;
		const n = c.seq.length;
		const drift = w.rules.drift.params;
		const band = w.rules.band.params;
		const noise = w.rules.noise.params;
		let tS = n > 0 ? c.timeMs[n - 1] / 1000 : null;
		if (!onPlateau) {
			// Approach, undercool, the end of the melt or freeze: slopes there are the physics, not drift.
			w.fit.reset();
			w.mean.reset();
			w.baseCurrent = null;
			w.steepNatural = false;
			// 'ending' can flip back to 'plateau' for a while: the end, once seen, stays seen.
			if (d && (d.state === 'ending' || d.state === 'ended')) w.endingByItself = true;
			else if (d) w.endingByItself = false;
		} else {
			for (let i = 0; i < n; i++) {
				const x = c.deltaMilliKelvin[i];
				if (c.flags[i] & 1 || Number.isNaN(x)) continue;
				const current = c.currentMilliAmp[i];
				w.baseCurrent ??= current;
				const t = c.timeMs[i] / 1000;
				if (Math.abs(current - w.baseCurrent) > CURRENT_TOLERANCE * w.baseCurrent) {
					w.settleUntilS = t + SETTLE_AFTER_CURRENT_CHANGE_S;
					continue;
				}
				if (t < w.settleUntilS) continue;
				tS = t;
				w.fit.push(t, x);
				w.mean.push(t, x);
				const f = w.fit.size >= 10 && w.fit.spanS >= 0.5 * drift.fitWindowMinutes * 60 ? w.fit.fit() : null;
				if (w.endingByItself) continue;
				if (f) {
					const s = f.slopeMilliKelvinPerHour;
					// A freeze falls and a melt rises by itself as it settles and as it ends (the final analysis
					// judges that): while the curve moves steeply that way, band and noise hold still, and only
					// a slope against the natural direction counts as drift.
					w.steepNatural = w.naturalSign !== 0 && s * w.naturalSign > NATURAL_END_FACTOR * drift.limitMilliKelvinPerHour;
					w.last.slope = s;
					const against = w.naturalSign === 0 || s * w.naturalSign < 0;
					w.drift.update(t, against && driftExcess(s, f.stdErrMilliKelvinPerHour, drift.k, drift.limitMilliKelvinPerHour) > 0, Math.abs(s) < CLEAR_FRACTION * drift.limitMilliKelvinPerHour);
				}
				if (w.steepNatural) continue;
				const m = w.mean.mean();
				if (m !== null && w.mean.count >= 3) {
					w.last.bandMean = m;
					w.band.update(t, Math.abs(m) > band.limitMilliKelvin, Math.abs(m) < CLEAR_FRACTION * band.limitMilliKelvin);
				}
			}
			const nz = d?.noiseMilliKelvin ?? null;
			if (nz !== null && tS !== null && !w.endingByItself && !w.steepNatural) {
				w.last.noise = nz;
				w.noise.update(tS, nz > noise.limitMilliKelvin, nz < CLEAR_FRACTION * noise.limitMilliKelvin);
			}
		}
		// The plateau ended (the detector left it for its end): earlier than the rule's minimum?
		if (d && w.wasPlateau && !onPlateau && (d.state === 'ending' || d.state === 'ended') && !d.rebuilding) {
			const minutes = (d.plateauElapsedS ?? 0) / 60;
			const min = w.rules['early-end'].params.minPlateauMinutes;
			if (w.rules['early-end'].enabled && minutes < min) this.oneShot(w, 'early-end', `The plateau lasted ${minutes.toFixed(0)} min, less than the ${min} min expected`, minutes, min, nowMs);
		}
		if (d) w.wasPlateau = onPlateau;
		// After a restart the detector is rebuilt from storage first: decide only on the present, not the replay.
		if (d?.rebuilding) return;
		const v = w.last;
		this.reconcile(w, 'drift', w.drift.on, v.slope, drift.limitMilliKelvinPerHour, () => `Plateau slope ${fmt(v.slope)} mK/h stayed beyond ±${drift.limitMilliKelvinPerHour} mK/h (allowing ${drift.k}·u) for ${drift.sustainMinutes} min`, nowMs);
		this.reconcile(w, 'band', w.band.on, v.bandMean, band.limitMilliKelvin, () => `On the plateau the value is ${fmt(v.bandMean)} mK from the expected value, outside ±${band.limitMilliKelvin} mK`, nowMs);
		this.reconcile(w, 'noise', w.noise.on, v.noise, noise.limitMilliKelvin, () => `Plateau noise ${fmt(v.noise)} mK is above ${noise.limitMilliKelvin} mK`, nowMs);
	}

	/** The server-side tick: silence, runs that stopped, R_TPW checks, escalation, rule changes. */
	tick(nowMs = Date.now()): void {
		this.loadRules(false);
		const recording = this.stmts.recording.all();
		const ids = new Set(recording.map((r) => r.id));
		for (const [runId, w] of this.watches) {
			if (ids.has(runId)) continue;
			// The run stopped recording: a silent instrument is no longer news; an R_TPW check may now count.
			const open = w.reported.silence;
			if (open !== undefined && this.store.clear(open, nowMs, 'the run stopped recording')) this.publish(open);
			this.watches.delete(runId);
			this.checkRtpwShift(runId, nowMs);
		}
		for (const r of recording) {
			const w = this.watch(r.id, r);
			if (!w) continue;
			const since = r.last_reading_at ?? r.started_at ?? r.created_at;
			const silentS = Math.max(0, (nowMs - since) / 1000);
			const limit = w.rules.silence.params.limitSeconds;
			w.silence.update(nowMs / 1000, silentS > limit, silentS <= limit);
			this.reconcile(w, 'silence', w.silence.on, silentS, limit, () => `No reading received for ${silentS.toFixed(silentS < 100 ? 1 : 0)} s (limit ${limit} s)`, nowMs);
		}
		this.checkNewRtpw(nowMs);
		const minutes = this.escalateAfterMinutes();
		for (const a of this.stmts.escalate.all(nowMs - minutes * 60_000)) {
			this.store.escalate(a.id, nowMs, minutes);
			this.publish(a.id);
		}
	}

	escalateAfterMinutes(): number {
		const row = this.stmts.setting.get('alerts.escalateAfterMinutes');
		const v = row ? Number(JSON.parse(row.value_json)) : NaN;
		return v > 0 ? v : Number(this.env.STILLPOINT_ALERT_ESCALATE_MINUTES) > 0 ? Number(this.env.STILLPOINT_ALERT_ESCALATE_MINUTES) : 15;
	}

	/** Evaluates the R_TPW before the run against the first one after it (once per run). */
	checkRtpwShift(runId: number, nowMs = Date.now()): void {
		const run = this.stmts.rtpwRun.get(runId);
		if (!run || run.ended_at === null) return;
		const rule = resolveRule('rtpw-shift', this.rules, run.fixed_point, run.id, parseRunLimits(run.settings_json));
		if (!rule.enabled) return;
		const before = this.stmts.rtpwBefore.get(run.thermometer_id, run.started_at ?? run.created_at);
		const after = this.stmts.rtpwAfter.get(run.thermometer_id, run.ended_at);
		if (!before || !after) return;
		const shift = rtpwShiftMilliKelvin(before.r_tpw_ohm, after.r_tpw_ohm);
		const limit = rule.params.limitMilliKelvin;
		if (Math.abs(shift) <= limit) return;
		if (this.stmts.anyByKey.get(`run:${run.id}:rtpw-shift`)) return;
		const r = this.store.onset({
			kind: 'rtpw-shift',
			runId: run.id,
			benchId: run.bench_id,
			ruleId: rule.ruleId,
			message: `R_TPW went from ${before.r_tpw_ohm.toFixed(6)} Ω before the run to ${after.r_tpw_ohm.toFixed(6)} Ω after it: ${fmt(shift)} mK equivalent, beyond ±${limit} mK`,
			value: shift,
			limitValue: limit,
			holdOffMs: 0,
			nowMs
		});
		this.publish(r.id);
	}

	private checkNewRtpw(nowMs: number): void {
		const row = this.stmts.setting.get('alerts.rtpwCursor');
		let cursor: number;
		if (!row) {
			// First start: R_TPW checks already on file were judged (or not) before alerts existed.
			cursor = this.stmts.maxRtpw.get()?.id ?? 0;
			this.stmts.putSetting.run('alerts.rtpwCursor', JSON.stringify(cursor));
			return;
		}
		cursor = Number(JSON.parse(row.value_json));
		const fresh = this.stmts.newRtpw.all(cursor);
		if (fresh.length === 0) return;
		for (const r of fresh) {
			const run = this.stmts.runBefore.get(r.thermometer_id, r.measured_at);
			if (run) this.checkRtpwShift(run.id, nowMs);
			cursor = r.id;
		}
		this.stmts.putSetting.run('alerts.rtpwCursor', JSON.stringify(cursor));
	}

	private oneShot(w: RunWatch, kind: AlertKind, message: string, value: number, limit: number, nowMs: number): void {
		if (this.stmts.anyByKey.get(`run:${w.runId}:${kind}`)) return;
		const r = this.store.onset({ kind, runId: w.runId, benchId: w.benchId, ruleId: w.rules[kind].ruleId, message, value, limitValue: limit, holdOffMs: 0, nowMs });
		this.publish(r.id);
	}

	private reconcile(w: RunWatch, kind: 'drift' | 'band' | 'noise' | 'silence', on: boolean, value: number | null, limit: number, message: () => string, nowMs: number): void {
		const rule = w.rules[kind];
		const id = w.reported[kind];
		if (on && rule.enabled && id === undefined) {
			const holdOffMs = (rule.params as { holdOffMinutes: number }).holdOffMinutes * 60_000;
			const r = this.store.onset({ kind, runId: w.runId, benchId: w.benchId, ruleId: rule.ruleId, message: message(), value, limitValue: limit, holdOffMs, nowMs });
			w.reported[kind] = r.id;
			w.lastTouchMs[kind] = nowMs;
			this.publish(r.id);
		} else if (on && id !== undefined) {
			if (nowMs - (w.lastTouchMs[kind] ?? 0) >= TOUCH_INTERVAL_MS) {
				w.lastTouchMs[kind] = nowMs;
				this.store.touch(id, value, nowMs);
				this.publish(id);
			}
		} else if (!on && id !== undefined) {
			delete w.reported[kind];
			const label = KIND_LABELS[kind].toLowerCase();
			if (this.store.clear(id, nowMs, `${label} back within ${CLEAR_FRACTION * 100}% of its limit`)) this.publish(id);
		}
	}

	private publish(id: number): void {
		const p = this.opts.publisher;
		if (!p) return;
		const s = this.store.summary(id);
		if (s) p.publishAlert(s);
	}

	/** Re-publishes an alert changed elsewhere (a person acknowledged it, the outbox sent its mail). */
	changed(id: number): void {
		this.publish(id);
	}

	private loadRules(force: boolean): void {
		const rows = this.stmts.rules.all();
		const version = rows.map((r) => `${r.id}:${r.updated_at}:${r.enabled}`).join(',');
		if (!force && version === this.rulesVersion) return;
		this.rulesVersion = version;
		this.rules = rows.map((r) => {
			let params: Record<string, unknown> = {};
			try {
				params = JSON.parse(r.params_json) as Record<string, unknown>;
			} catch {
				/* a broken row counts as no settings */
			}
			return { id: r.id, kind: r.kind, fixedPoint: r.fixed_point, runId: r.run_id, params, enabled: r.enabled === 1 };
		});
		for (const w of this.watches.values()) w.loadedAtMs = 0;
	}

	private watch(runId: number, row?: RunRow): RunWatch | null {
		let w = this.watches.get(runId);
		const nowMs = Date.now();
		if (w && nowMs - w.loadedAtMs < WATCH_REFRESH_MS) return w;
		const r = row ?? this.stmts.run.get(runId);
		if (!r || r.state !== 'recording') return w ?? null;
		const limits = parseRunLimits(r.settings_json);
		const rules = {} as RunWatch['rules'];
		for (const kind of Object.keys(DEFAULT_PARAMS) as AlertKind[]) (rules as Record<AlertKind, unknown>)[kind] = resolveRule(kind, this.rules, r.fixed_point, r.id, limits);
		if (w) {
			w.rules = rules;
			w.loadedAtMs = nowMs;
			const p = rules as { [K in AlertKind]: Resolved<K> };
			w.drift.sustainS = p.drift.params.sustainMinutes * 60;
			w.drift.clearS = p.drift.params.clearMinutes * 60;
			w.band.sustainS = p.band.params.sustainSeconds;
			w.band.clearS = p.band.params.clearSeconds;
			w.noise.sustainS = p.noise.params.sustainSeconds;
			w.noise.clearS = p.noise.params.clearSeconds;
			return w;
		}
		const params = (k: AlertKind) => rules[k].params as RuleParams[typeof k];
		const drift = params('drift') as RuleParams['drift'];
		const band = params('band') as RuleParams['band'];
		const noise = params('noise') as RuleParams['noise'];
		w = {
			runId: r.id,
			benchId: r.bench_id,
			fixedPoint: r.fixed_point,
			loadedAtMs: nowMs,
			rules,
			fit: new SlopeWindow(drift.fitWindowMinutes * 60),
			mean: new RollingMean(band.meanWindowSeconds),
			baseCurrent: null,
			settleUntilS: -Infinity,
			naturalSign: r.kind === 'freeze' ? -1 : r.kind === 'melt' ? 1 : 0,
			endingByItself: false,
			steepNatural: false,
			drift: new Sustained(drift.sustainMinutes * 60, drift.clearMinutes * 60),
			band: new Sustained(band.sustainSeconds, band.clearSeconds),
			noise: new Sustained(noise.sustainSeconds, noise.clearSeconds),
			silence: new Sustained(0, 0),
			wasPlateau: false,
			reported: {},
			lastTouchMs: {},
			last: { slope: null, bandMean: null, noise: null }
		};
		// Alerts left open by an earlier process: this engine now owns them (and clears them when due).
		for (const open of this.store.openForRun(r.id)) if (open.kind === 'drift' || open.kind === 'band' || open.kind === 'noise' || open.kind === 'silence') w.reported[open.kind] = open.id;
		for (const kind of ['drift', 'band', 'noise', 'silence'] as const) {
			const cond = w[kind];
			if (w.reported[kind] !== undefined) cond.on = true;
		}
		this.watches.set(runId, w);
		return w;
	}
}

function fmt(x: number | null): string {
	if (x === null || !Number.isFinite(x)) return '—';
	const a = Math.abs(x);
	return x.toFixed(a >= 100 ? 0 : a >= 10 ? 1 : a >= 1 ? 2 : 3);
}

// One engine per process, shared through globalThis (Vite's dev server may load this module twice).
const KEY = Symbol.for('stillpoint.alerts');
type WithAlerts = typeof globalThis & { [KEY]?: AlertEngine };

export function setAlertEngine(engine: AlertEngine | null): void {
	const g = globalThis as WithAlerts;
	if (engine) g[KEY] = engine;
	else delete g[KEY];
}

export function alertEngine(): AlertEngine | null {
	return (globalThis as WithAlerts)[KEY] ?? null;
}
