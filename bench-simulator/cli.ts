// Stillpoint bench simulator: a simulated SPRT + bridge on a fixed-point cell, speaking the ingest
// protocol like a lab's instrument script. `npm run simulate -- --help`.

import { writeFileSync } from 'node:fs';
import { CLI_FLAGS, kebab, parseArgs, UsageError, type CliOptions } from './src/cli-args';
import { RunUnavailableError, TokenRefusedError } from './src/client-common';
import { runBench } from './src/bench';
import { PARAM_DOCS } from './src/params';
import { listScenarios } from './src/simulate';

export const EXIT = { ok: 0, error: 1, tokenRefused: 2, runUnavailable: 3, usage: 64 } as const;

function helpText(): string {
	const lines: string[] = [];
	lines.push('Usage: npm run simulate -- [SCENARIO] [flags]');
	lines.push('');
	lines.push('Simulates a standard platinum resistance thermometer in an ITS-90 fixed-point cell read by a');
	lines.push('resistance-ratio bridge, and emits the readings (seq, timeMs, ratio, currentMilliAmp, channel)');
	lines.push('to stdout as NDJSON or to Stillpoint over HTTP or WebSocket. Time runs faster than real time;');
	lines.push('readings are stamped on the simulated clock (starting at --epoch-ms, default now).');
	lines.push('');
	lines.push('Scenarios:');
	for (const s of listScenarios()) lines.push(`  ${s.name.padEnd(24)} ${s.description}`);
	lines.push('');
	lines.push('Flags:');
	for (const [f, d] of CLI_FLAGS) lines.push(`  ${f.padEnd(28)} ${d}`);
	lines.push('');
	lines.push('Scenario parameters (each overrides the scenario default; "none" clears an optional one):');
	for (const [k, d] of Object.entries(PARAM_DOCS)) lines.push(`  --${kebab(k).padEnd(40)} ${d}`);
	lines.push('');
	lines.push('Examples:');
	lines.push('  npm run simulate -- zn-freeze --seed 7 --truth truth.json > readings.ndjson');
	lines.push('  STILLPOINT_BENCH_TOKEN=spb_... npm run simulate -- sn-freeze --target http --speed 300');
	lines.push('  npm run simulate -- tpw-triple-point --target ws --url http://127.0.0.1:5173 --token spb_...');
	lines.push('');
	lines.push('Exit status: 0 done, 1 error, 2 token refused (401/403), 3 no active run / run gone, 64 usage.');
	return lines.join('\n');
}

async function main(argv: string[]): Promise<number> {
	let o: CliOptions;
	try {
		o = parseArgs(argv);
	} catch (e) {
		if (e instanceof UsageError) {
			process.stderr.write(`bench-simulator: ${e.message}\n`);
			return EXIT.usage;
		}
		throw e;
	}
	if (o.help) {
		process.stdout.write(helpText() + '\n');
		return EXIT.ok;
	}
	if (o.list) {
		for (const s of listScenarios()) process.stdout.write(`${s.name}\t${s.point}\t${s.kind}\t${s.fault ?? ''}\t${s.description}\n`);
		return EXIT.ok;
	}
	if (!o.scenario) {
		process.stderr.write('bench-simulator: name a scenario (see --help or --list)\n');
		return EXIT.usage;
	}
	if (o.target !== 'stdout' && !o.token) {
		process.stderr.write(`bench-simulator: --target ${o.target} needs --token or STILLPOINT_BENCH_TOKEN\n`);
		return EXIT.usage;
	}
	const log = o.quiet ? () => {} : (m: string) => process.stderr.write(`bench-simulator: ${m}\n`);
	const asFast = o.asFastAsPossible || (o.target === 'stdout' && o.speed === null);
	let bench;
	try {
		bench = runBench({
			scenario: o.scenario,
			overrides: o.overrides,
			seed: o.seed,
			target: o.target,
			url: o.url,
			token: o.token ?? undefined,
			runId: o.runId ?? undefined,
			speed: o.speed ?? 300,
			asFastAsPossible: asFast,
			client: {
				...(o.batchSize !== null ? { batchSize: o.batchSize } : {}),
				...(o.bufferCapacity !== null ? { bufferCapacity: o.bufferCapacity } : {}),
				...(o.flushIntervalMs !== null ? { flushIntervalMs: o.flushIntervalMs } : {})
			},
			log,
			onEvent: o.events ? (e) => process.stderr.write(JSON.stringify({ event: e }) + '\n') : undefined
		});
	} catch (e) {
		process.stderr.write(`bench-simulator: ${(e as Error).message}\n`);
		return EXIT.usage;
	}
	if (o.truthFile) writeFileSync(o.truthFile, JSON.stringify(bench.truth, null, 2));
	if (o.overrides.epochMs === undefined && o.target !== 'stdout') log('tip: pass --epoch-ms and --seed to be able to resume this exact run later');
	const onSignal = () => {
		log('stopping…');
		void bench.stop();
	};
	process.once('SIGINT', onSignal);
	process.once('SIGTERM', onSignal);
	try {
		const r = await bench.done;
		log(`done: ${r.readingsEmitted} readings${r.skippedAlreadyStored ? `, ${r.skippedAlreadyStored} skipped (already stored)` : ''}${r.client ? `; server holds up to seq ${r.client.highestDurableSeq}` : ''}`);
		return r.stoppedEarly ? 130 : EXIT.ok;
	} catch (e) {
		if (e instanceof TokenRefusedError) {
			process.stderr.write(`bench-simulator: ${e.message}\n  Check the bench token (it may be revoked) and that the run is recording.\n`);
			return EXIT.tokenRefused;
		}
		if (e instanceof RunUnavailableError) {
			process.stderr.write(`bench-simulator: ${e.message}\n  Start a run for this bench in Stillpoint (state "recording"), or pass --run.\n`);
			return EXIT.runUnavailable;
		}
		process.stderr.write(`bench-simulator: ${(e as Error).stack ?? e}\n`);
		return EXIT.error;
	}
}

// a closed pipe (e.g. `| head`) is a normal way for a reader to stop us
process.stdout.on('error', (e: NodeJS.ErrnoException) => {
	if (e.code === 'EPIPE') process.exit(EXIT.ok);
	throw e;
});

main(process.argv.slice(2)).then(
	(code) => {
		// let stdout drain before leaving
		process.stdout.write('', () => process.exit(code));
	},
	(e) => {
		process.stderr.write(`bench-simulator: ${(e as Error).stack ?? e}\n`);
		process.exit(EXIT.error);
	}
);
