// Number formatting for the engineer's pages: a true minus sign, fixed digits, coefficients as m × 10ⁿ.

export function signed(v: number | null | undefined, digits: number): string {
	if (v == null || !Number.isFinite(v)) return '—';
	const t = Math.abs(v).toFixed(digits);
	return v < 0 && Number(t) !== 0 ? `−${t}` : v > 0 && Number(t) !== 0 ? `+${t}` : t;
}

export function plain(v: number | null | undefined, digits: number): string {
	if (v == null || !Number.isFinite(v)) return '—';
	const t = Math.abs(v).toFixed(digits);
	return v < 0 && Number(t) !== 0 ? `−${t}` : t;
}

const SUPERSCRIPT: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };

/** −1.2134 × 10⁻⁴ */
export function sci(v: number | null | undefined, digits = 5): string {
	if (v == null || !Number.isFinite(v)) return '—';
	if (v === 0) return '0';
	const [m, e] = v.toExponential(digits - 1).split('e');
	const exp = String(Number(e)).split('').map((c) => SUPERSCRIPT[c] ?? c).join('');
	return `${m.replace('-', '−')} × 10${exp}`;
}

export function utcDate(ms: number | null | undefined): string {
	return ms == null ? '—' : new Date(ms).toISOString().slice(0, 10);
}
