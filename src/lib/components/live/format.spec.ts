import { describe, expect, it } from 'vitest';
import { RateMeter, ageText, durationText, signedMilliKelvin, silenceTone, slopeText, stateWording, valueFromAssignedMilliKelvin } from './format';

describe('bench screen wording and numbers', () => {
	it('words every tracker state in our own terms, by the kind of run', () => {
		expect(stateWording('plateau', 'freeze')).toMatchObject({ label: 'On the plateau', tone: 'steady' });
		expect(stateWording('approach', 'melt').label).toBe('Warming towards the melt');
		expect(stateWording('approach', 'triple-point').label).toBe('Thermometer settling');
		expect(stateWording('ending', 'freeze').tone).toBe('caution');
		expect(stateWording(undefined, 'freeze').label).toBe('No tracker figures yet');
	});

	it('puts the unit on every figure', () => {
		expect(signedMilliKelvin(0.1234)).toBe('+0.123 mK');
		expect(signedMilliKelvin(-0.0001)).toBe('0.000 mK');
		expect(signedMilliKelvin(null)).toBe('— mK');
		expect(slopeText(0.5, 0.02)).toBe('0.500 ± 0.020 mK/h');
		expect(durationText(45)).toBe('45 s');
		expect(durationText(750)).toBe('12 min 30 s');
		expect(durationText(3900)).toBe('1 h 05 min');
		expect(ageText(3.7)).toBe('3 s');
	});

	it('turns the silence colour to caution at half the limit and fault at the limit', () => {
		expect(silenceTone(10, 120).tone).toBe('steady');
		expect(silenceTone(60, 120).tone).toBe('caution');
		expect(silenceTone(120, 120).tone).toBe('fault');
		expect(silenceTone(null, 120).tone).toBe('muted');
	});

	it('gives the value against the expected temperature in mK', () => {
		const d = { valueKelvin: 429.7485, state: 'plateau' } as Parameters<typeof valueFromAssignedMilliKelvin>[0];
		expect(valueFromAssignedMilliKelvin(d, 429.7495)).toBeCloseTo(-1, 6);
		expect(valueFromAssignedMilliKelvin(d, null)).toBeNull();
	});

	it('counts readings per minute over the last minute', () => {
		const m = new RateMeter();
		m.add(10, 0);
		m.add(20, 30_000);
		expect(m.perMinute(60_000)).toBeCloseTo(30, 6);
		expect(m.perMinute(80_000)).toBeCloseTo(20, 6);
		expect(m.perMinute(100_000)).toBeNull();
	});
});
