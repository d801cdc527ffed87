// The text of an alert e-mail: what fired, the value, the limit, the run and a link. Pure.

export interface AlertMailInput {
	alertId: number;
	reason: 'raised' | 'reopened' | 'escalated';
	kindLabel: string;
	message: string;
	value: number | null;
	limitValue: number | null;
	unit: string;
	runId: number | null;
	benchName: string | null;
	fixedPoint: string | null;
	raisedAtMs: number;
	publicUrl: string;
	escalateAfterMinutes?: number;
}

export function formatValue(x: number | null, unit: string): string {
	if (x === null || !Number.isFinite(x)) return '—';
	const digits = Math.abs(x) >= 100 ? 0 : Math.abs(x) >= 10 ? 1 : Math.abs(x) >= 1 ? 2 : 3;
	return `${x.toFixed(digits)} ${unit}`;
}

export function composeAlertMail(a: AlertMailInput): { subject: string; text: string } {
	const base = a.publicUrl.replace(/\/+$/, '');
	const where = [a.benchName, a.runId !== null ? `run #${a.runId}` : null].filter(Boolean).join(', ');
	const prefix = a.reason === 'escalated' ? '[Stillpoint, not yet acknowledged] ' : '[Stillpoint] ';
	const subject = `${prefix}${a.kindLabel}${where ? ` — ${where}` : ''}`;
	const lines = [
		a.reason === 'escalated'
			? `This alert has not been acknowledged${a.escalateAfterMinutes ? ` within ${a.escalateAfterMinutes} min` : ''}; you are on the second list.`
			: 'An alert needs a person.',
		'',
		`What fired: ${a.kindLabel}`,
		`Detail:     ${a.message}`,
		`Value:      ${formatValue(a.value, a.unit)}`,
		`Limit:      ${formatValue(a.limitValue, a.unit)}`,
		`Run:        ${a.runId !== null ? `#${a.runId}` : '—'}${a.fixedPoint ? ` (${a.fixedPoint})` : ''}${a.benchName ? ` on ${a.benchName}` : ''}`,
		`Raised:     ${new Date(a.raisedAtMs).toISOString().replace('T', ' ').slice(0, 19)} UTC`,
		'',
		`Acknowledge it: ${base}/alerts?alert=${a.alertId}`,
		...(a.runId !== null ? [`The run:        ${base}/runs/${a.runId}`] : []),
		'',
		'Sent by Stillpoint to the supervisors on duty and the run’s technician.'
	];
	return { subject, text: lines.join('\n') };
}
