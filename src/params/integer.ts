import type { ParamMatcher } from '@sveltejs/kit';

/** A positive integer id without leading zeros or sign (e.g. a run id). */
export const match = ((param: string): boolean => /^[1-9][0-9]{0,15}$/.test(param)) satisfies ParamMatcher;
