import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import {
	currentDraw,
	currentPerLeg,
	judgeReading,
	outputFrequency,
	serviceVoltageBand,
	serviceVoltageRanges,
	speedForFrequency
} from '../../../src/lib/pricing/bench';

describe('judging a reading against a spec range', () => {
	it('passes a 0.4 Ω stator winding against a 0.3–0.5 Ω spec', () => {
		// Common practice for a 5 kW-class portable unit, no source.
		expect(judgeReading(0.4, { min: 0.3, max: 0.5 })).toBe('pass');
	});

	it('includes both bounds and calls the rest low or high', () => {
		expect(judgeReading(0.3, { min: 0.3, max: 0.5 })).toBe('pass');
		expect(judgeReading(0.5, { min: 0.3, max: 0.5 })).toBe('pass');
		expect(judgeReading(0.29, { min: 0.3, max: 0.5 })).toBe('low');
		expect(judgeReading(0.51, { min: 0.3, max: 0.5 })).toBe('high');
	});

	it('calls an over-limit meter or a reading above the open threshold open, and near zero a short', () => {
		const spec = { min: 0.3, max: 0.5, openAbove: 1000, shortBelow: 0.05 };
		expect(judgeReading('OL', spec)).toBe('open');
		expect(judgeReading(5000, spec)).toBe('open');
		expect(judgeReading(0.01, spec)).toBe('short');
		expect(judgeReading(0.2, spec)).toBe('low');
		expect(judgeReading(20, spec)).toBe('high');
	});

	it('refuses NaN, Infinity and an upside-down range instead of guessing', () => {
		expect(() => judgeReading(Number.NaN, { min: 0, max: 1 })).toThrow(RangeError);
		expect(() => judgeReading(Number.POSITIVE_INFINITY, { min: 0, max: 1 })).toThrow(RangeError);
		expect(() => judgeReading(1, { min: 2, max: 1 })).toThrow(/upside down/);
	});
});

describe('frequency, current and voltage', () => {
	it('gives 60 Hz for 2 poles at 3600 rpm and 4 poles at 1800 rpm', () => {
		// f = poles × rpm / 120: 2 × 3600 / 120 = 60; 4 × 1800 / 120 = 60.
		expect(outputFrequency(2, 3600)).toBe(60);
		expect(outputFrequency(4, 1800)).toBe(60);
		expect(outputFrequency(4, 1500)).toBe(50);
		expect(speedForFrequency(2, 60)).toBe(3600);
		expect(() => outputFrequency(3, 3600)).toThrow(RangeError);
	});

	it('gives 31.25 A per leg for 7500 W on a 120/240 V unit', () => {
		// Balanced full load on split phase: P / 240 = 7500 / 240 = 31.25 A in each leg.
		expect(currentPerLeg(7500, '120/240')).toBe(31.25);
		// The same load on 120 V only: 7500 / 120 = 62.5 A.
		expect(currentPerLeg(7500, '120')).toBe(62.5);
		expect(currentDraw(1200, 120)).toBe(10);
		expect(() => currentDraw(1200, 0)).toThrow(RangeError);
	});

	it('knows ANSI C84.1 Range A for 120 V as 114–126 V (from memory of the standard, not a copy)', () => {
		expect(serviceVoltageRanges[120].A).toEqual({ min: 114, max: 126 });
		expect(serviceVoltageRanges[240].B).toEqual({ min: 220, max: 254 });
		expect(serviceVoltageBand(120, 120)).toBe('range-a');
		expect(serviceVoltageBand(112, 120)).toBe('range-b');
		expect(serviceVoltageBand(127, 120)).toBe('range-b');
		expect(serviceVoltageBand(108, 120)).toBe('outside');
		expect(serviceVoltageBand(250, 240)).toBe('range-a');
	});

	it('never returns NaN or Infinity: it answers or refuses', () => {
		const anyNumber = fc.oneof(fc.double(), fc.integer(), fc.constantFrom(Number.NaN, Infinity, -Infinity, 0, -0));
		fc.assert(
			fc.property(anyNumber, anyNumber, (a, b) => {
				for (const run of [() => outputFrequency(a, b), () => currentDraw(a, b), () => currentPerLeg(a, '120/240')]) {
					try {
						expect(Number.isFinite(run())).toBe(true);
					} catch (error) {
						expect(error).toBeInstanceOf(RangeError);
					}
				}
				try {
					expect(['pass', 'low', 'high', 'open', 'short']).toContain(judgeReading(a, { min: Math.min(b, 1), max: 1 }));
				} catch (error) {
					expect(error).toBeInstanceOf(RangeError);
				}
			}),
			{ numRuns: 1000 }
		);
	});
});
