// The CLI as a lab would run it: spawned with tsx.

import { spawn } from 'node:child_process';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { TestPeer, validateReading } from './test/peer';
import { listScenarios } from './src/index';

const ROOT = join(import.meta.dirname, '..');
const TSX = join(ROOT, 'node_modules', '.bin', 'tsx');

function run(args: string[], env: Record<string, string> = {}): Promise<{ code: number | null; stdout: string; stderr: string }> {
	return new Promise((resolve) => {
		const p = spawn(TSX, [join(ROOT, 'bench-simulator', 'cli.ts'), ...args], { cwd: ROOT, env: { ...process.env, ...env } });
		let stdout = '', stderr = '';
		p.stdout.on('data', (d) => (stdout += d));
		p.stderr.on('data', (d) => (stderr += d));
		p.on('close', (code) => resolve({ code, stdout, stderr }));
	});
}

describe('cli', () => {
	it('--help exits 0 and lists every scenario and the main flags', async () => {
		const r = await run(['--help']);
		expect(r.code).toBe(0);
		for (const s of listScenarios()) expect(r.stdout).toContain(s.name);
		for (const f of ['--target', '--speed', '--as-fast-as-possible', '--truth', '--token', '--reading-interval-s', '--impurity-mol-fraction']) expect(r.stdout).toContain(f);
	});

	it('writes valid NDJSON protocol readings and the truth file', async () => {
		const dir = mkdtempSync(join(tmpdir(), 'bench-sim-'));
		const truthFile = join(dir, 'truth.json');
		const r = await run(['quick-in-freeze', '--duration-hours', '0.1', '--epoch-ms', '2024-05-01T08:00:00Z', '--truth', truthFile, '--quiet']);
		expect(r.code).toBe(0);
		const lines = r.stdout.trim().split('\n');
		expect(lines.length).toBe(361); // 0.1 h at 1 s, both ends
		for (const line of lines) {
			const o = JSON.parse(line) as Record<string, unknown>;
			expect(Object.keys(o).sort()).toEqual(['channel', 'currentMilliAmp', 'ratio', 'seq', 'timeMs']);
			expect(validateReading(o)).toEqual([]);
		}
		expect(JSON.parse(lines[0]).timeMs).toBe(Date.parse('2024-05-01T08:00:00Z'));
		const truth = JSON.parse(readFileSync(truthFile, 'utf8'));
		expect(truth.scenario).toBe('quick-in-freeze');
		expect(truth.readingCount).toBe(lines.length);
	});

	it('rejects an unknown flag with a usage error', async () => {
		const r = await run(['quick-in-freeze', '--no-such-flag', '1']);
		expect(r.code).toBe(64);
		expect(r.stderr).toContain('unknown flag');
	});

	it('exits 2 with a clear message when the token is refused', async () => {
		const peer = new TestPeer({ token: 'spb_right' });
		const url = await peer.start();
		try {
			const r = await run(['quick-in-freeze', '--target', 'http', '--url', url, '--as-fast-as-possible'], { STILLPOINT_BENCH_TOKEN: 'spb_wrong' });
			expect(r.code).toBe(2);
			expect(r.stderr).toMatch(/refused the bench token/);
		} finally {
			await peer.stop();
		}
	});
});
