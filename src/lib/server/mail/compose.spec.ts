import { describe, expect, it } from 'vitest';
import { composeAlertMail } from './compose';

describe('composeAlertMail', () => {
	it('says what fired, the value and limit with units, the run and a link', () => {
		const m = composeAlertMail({ alertId: 12, reason: 'raised', kindLabel: 'Plateau drift', message: 'slope beyond', value: 1.234, limitValue: 0.5, unit: 'mK/h', runId: 41, benchName: 'Bench 3 · zinc', fixedPoint: 'Zn', raisedAtMs: Date.UTC(2026, 11, 2, 10, 0, 0), publicUrl: 'http://lab.example/' });
		expect(m.subject).toBe('[Stillpoint] Plateau drift — Bench 3 · zinc, run #41');
		expect(m.text).toContain('Value:      1.23 mK/h');
		expect(m.text).toContain('Limit:      0.500 mK/h');
		expect(m.text).toContain('Run:        #41 (Zn) on Bench 3 · zinc');
		expect(m.text).toContain('http://lab.example/alerts?alert=12');
		expect(m.text).toContain('http://lab.example/runs/41');
		expect(m.text).toContain('2026-12-02 10:00:00 UTC');
	});
	it('marks an escalation', () => {
		const m = composeAlertMail({ alertId: 1, reason: 'escalated', kindLabel: 'Instrument silent', message: 'm', value: 300, limitValue: 120, unit: 's', runId: 2, benchName: null, fixedPoint: null, raisedAtMs: 0, publicUrl: 'http://x', escalateAfterMinutes: 15 });
		expect(m.subject.startsWith('[Stillpoint, not yet acknowledged]')).toBe(true);
		expect(m.text).toContain('within 15 min');
	});
});
