// One error type for the whole core, so callers (API routes, the simulator) can map a code to a
// response instead of parsing messages.

export type MetrologyErrorCode =
	| 'out_of_range'
	| 'invalid_input'
	| 'missing_point'
	| 'not_converged'
	| 'unknown_id'
	| 'singular_system';

export class MetrologyError extends Error {
	readonly code: MetrologyErrorCode;
	readonly details: Record<string, unknown>;

	constructor(code: MetrologyErrorCode, message: string, details: Record<string, unknown> = {}) {
		super(message);
		this.name = 'MetrologyError';
		this.code = code;
		this.details = details;
	}
}

/** Throws invalid_input unless value is a finite number. `where` names the calling function. */
export function requireFinite(value: number, what: string, where: string): void {
	if (typeof value !== 'number' || !Number.isFinite(value)) {
		throw new MetrologyError('invalid_input', `${where}: ${what} must be a finite number, got ${String(value)}`, {
			where,
			what,
			value
		});
	}
}

/** Throws invalid_input unless value is finite and > 0. */
export function requirePositive(value: number, what: string, where: string): void {
	requireFinite(value, what, where);
	if (value <= 0) {
		throw new MetrologyError('invalid_input', `${where}: ${what} must be > 0, got ${value}`, { where, what, value });
	}
}

/** Throws invalid_input unless value is finite and >= 0. */
export function requireNonNegative(value: number, what: string, where: string): void {
	requireFinite(value, what, where);
	if (value < 0) {
		throw new MetrologyError('invalid_input', `${where}: ${what} must be >= 0, got ${value}`, { where, what, value });
	}
}
