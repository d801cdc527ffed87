// Command-line parsing for cli.ts: every ScenarioParams field is a --kebab-case flag.

import { PARAM_DOCS, type ScenarioOverrides } from './params';

export interface CliOptions {
	help: boolean;
	list: boolean;
	scenario: string | null;
	seed: number;
	target: 'stdout' | 'http' | 'ws';
	url: string;
	token: string | null;
	runId: string | null;
	speed: number | null;
	asFastAsPossible: boolean;
	truthFile: string | null;
	events: boolean;
	quiet: boolean;
	batchSize: number | null;
	bufferCapacity: number | null;
	flushIntervalMs: number | null;
	overrides: ScenarioOverrides;
}

export class UsageError extends Error {}

export const kebab = (key: string) => key.replace(/\./g, '-').replace(/[A-Z]/g, (c) => '-' + c.toLowerCase());

const STRING_PARAMS = new Set(['point', 'kind', 'fault', 'thermometer.serial', 'thermometer.subrange']);
const NULLABLE = new Set(['durationHours', 'precoolOffsetKelvin', 'nucleationAtMinutes', 'innerInterfaceAfterMinutes', 'fault']);
const PARAM_FLAGS = new Map(Object.keys(PARAM_DOCS).map((k) => [kebab(k), k]));

export const CLI_FLAGS: [string, string][] = [
	['--scenario NAME', 'scenario to run (also accepted as the first positional argument)'],
	['--list', 'list the scenarios and exit'],
	['--seed N', 'PRNG seed; the same seed and --epoch-ms give the same readings (default 1)'],
	['--target stdout|http|ws', 'where readings go (default stdout: NDJSON, one protocol reading per line)'],
	['--url URL', 'Stillpoint base URL for http/ws (default http://127.0.0.1:5173)'],
	['--token TOKEN', 'bench token spb_… (or env STILLPOINT_BENCH_TOKEN, which keeps it out of ps)'],
	['--run ID', 'run id; otherwise found with GET /api/v1/bench/run'],
	['--speed N', 'simulated seconds per real second (default 300 for http/ws)'],
	['--as-fast-as-possible', 'no pacing (default for stdout unless --speed is given)'],
	['--truth FILE', 'write the ground truth as JSON to FILE before streaming'],
	['--events', 'print bench events (nucleation, current changes, faults) to stderr as JSON lines'],
	['--quiet', 'no progress messages on stderr'],
	['--batch-size N', 'readings per POST / per WebSocket frame (default 500 / 200)'],
	['--buffer-capacity N', 'unacknowledged readings kept before the simulator waits (default 100000)'],
	['--flush-interval-ms N', 'longest wait before a partial HTTP batch is sent (default 1000)'],
	['--help, -h', 'this text']
];

function num(flag: string, v: string): number {
	const n = Number(v);
	if (v.trim() === '' || !Number.isFinite(n)) throw new UsageError(`${flag} needs a number, got '${v}'`);
	return n;
}

function setPath(o: Record<string, unknown>, path: string, value: unknown) {
	const parts = path.split('.');
	let cur = o;
	for (const p of parts.slice(0, -1)) cur = (cur[p] ??= {}) as Record<string, unknown>;
	cur[parts[parts.length - 1]] = value;
}

function paramValue(key: string, flag: string, v: string): unknown {
	if (NULLABLE.has(key) && (v === 'none' || v === 'null')) return null;
	if (key === 'epochMs') {
		if (/^\d+$/.test(v)) return Number(v);
		const t = Date.parse(v);
		if (!Number.isFinite(t)) throw new UsageError(`${flag} needs UTC ms or an ISO date, got '${v}'`);
		return t;
	}
	if (key === 'thermometer.coefficients') {
		try {
			return JSON.parse(v);
		} catch {
			throw new UsageError(`${flag} needs JSON, e.g. '{"a":-1.2e-4,"b":-1e-5}'`);
		}
	}
	if (STRING_PARAMS.has(key)) return v;
	return num(flag, v);
}

export function parseArgs(argv: string[], env: NodeJS.ProcessEnv = process.env): CliOptions {
	const o: CliOptions = {
		help: false,
		list: false,
		scenario: null,
		seed: 1,
		target: 'stdout',
		url: 'http://127.0.0.1:5173',
		token: env.STILLPOINT_BENCH_TOKEN ?? null,
		runId: null,
		speed: null,
		asFastAsPossible: false,
		truthFile: null,
		events: false,
		quiet: false,
		batchSize: null,
		bufferCapacity: null,
		flushIntervalMs: null,
		overrides: {}
	};
	for (let i = 0; i < argv.length; i++) {
		let arg = argv[i];
		let inline: string | null = null;
		const eq = arg.indexOf('=');
		if (arg.startsWith('--') && eq > 0) {
			inline = arg.slice(eq + 1);
			arg = arg.slice(0, eq);
		}
		const value = () => {
			if (inline !== null) return inline;
			const v = argv[++i];
			if (v === undefined) throw new UsageError(`${arg} needs a value`);
			return v;
		};
		switch (arg) {
			case '--help':
			case '-h':
				o.help = true;
				break;
			case '--list':
				o.list = true;
				break;
			case '--scenario':
				o.scenario = value();
				break;
			case '--seed':
				o.seed = num(arg, value());
				break;
			case '--target': {
				const t = value();
				if (t !== 'stdout' && t !== 'http' && t !== 'ws') throw new UsageError(`--target must be stdout, http or ws, got '${t}'`);
				o.target = t;
				break;
			}
			case '--url':
				o.url = value();
				break;
			case '--token':
				o.token = value();
				break;
			case '--run':
				o.runId = value();
				break;
			case '--speed':
				o.speed = num(arg, value());
				if (!(o.speed > 0)) throw new UsageError('--speed must be > 0');
				break;
			case '--as-fast-as-possible':
				o.asFastAsPossible = true;
				break;
			case '--truth':
				o.truthFile = value();
				break;
			case '--events':
				o.events = true;
				break;
			case '--quiet':
				o.quiet = true;
				break;
			case '--batch-size':
				o.batchSize = num(arg, value());
				break;
			case '--buffer-capacity':
				o.bufferCapacity = num(arg, value());
				break;
			case '--flush-interval-ms':
				o.flushIntervalMs = num(arg, value());
				break;
			default: {
				if (!arg.startsWith('-')) {
					if (o.scenario !== null) throw new UsageError(`unexpected argument '${arg}'`);
					o.scenario = arg;
					break;
				}
				const key = PARAM_FLAGS.get(arg.slice(2));
				if (!key) throw new UsageError(`unknown flag ${arg} (see --help)`);
				setPath(o.overrides as Record<string, unknown>, key, paramValue(key, arg, value()));
			}
		}
	}
	if (o.overrides.fault !== undefined && (o.overrides.fault as string | null) === 'none') o.overrides.fault = null;
	return o;
}
