// Shared by the *.spec.ts files only.
import { MetrologyError, type MetrologyErrorCode } from './errors';

/** Runs fn and returns the MetrologyError code it threw, or a description of what happened instead. */
export function thrownCode(fn: () => unknown): MetrologyErrorCode | string {
	try {
		fn();
	} catch (e) {
		return e instanceof MetrologyError ? e.code : `non-MetrologyError: ${String(e)}`;
	}
	return 'no error thrown';
}
