// Prints one closing line for the whole test command: "N passed, N failed, N skipped".
import { existsSync, readFileSync } from 'node:fs';

const [vitestFile, playwrightFile] = process.argv.slice(2);
let passed = 0;
let failed = 0;
let skipped = 0;
let missing = [];

if (existsSync(vitestFile)) {
	const v = JSON.parse(readFileSync(vitestFile, 'utf8'));
	passed += v.numPassedTests ?? 0;
	failed += (v.numFailedTests ?? 0) + (v.numFailedTestSuites && !v.numFailedTests ? v.numFailedTestSuites : 0);
	skipped += (v.numPendingTests ?? 0) + (v.numTodoTests ?? 0);
} else missing.push('vitest');

if (existsSync(playwrightFile)) {
	const p = JSON.parse(readFileSync(playwrightFile, 'utf8'));
	passed += p.stats?.expected ?? 0;
	failed += (p.stats?.unexpected ?? 0) + (p.stats?.flaky ?? 0);
	skipped += p.stats?.skipped ?? 0;
	if (p.errors?.length) failed += p.errors.length;
} else missing.push('playwright');

if (missing.length) {
	console.error(`no results from: ${missing.join(', ')}`);
	failed += missing.length;
}
console.log(`${passed} passed, ${failed} failed, ${skipped} skipped`);
process.exit(failed > 0 ? 1 : 0);
