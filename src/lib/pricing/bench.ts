// Bench arithmetic on plain numbers: readings are measurements, not money. Every function checks its
// inputs so that no result is NaN or Infinity.

export type ReadingResult = 'pass' | 'low' | 'high' | 'open' | 'short';

/** What a meter shows when the reading is over its range. */
export const OVER_LIMIT = 'OL';

export interface SpecRange {
	/** Lowest acceptable reading, inclusive. */
	min: number;
	/** Highest acceptable reading, inclusive. */
	max: number;
	/** A reading at or above this counts as an open circuit (resistance readings). */
	openAbove?: number;
	/** A reading below this counts as a short (resistance readings near zero). */
	shortBelow?: number;
}

function requireFinite(value: number, what: string): number {
	if (typeof value !== 'number' || !Number.isFinite(value)) throw new RangeError(`${what} must be a finite number.`);
	return value;
}

/** Judges a reading against a spec range; "OL" (over limit) or a reading at or above openAbove is open. */
export function judgeReading(reading: number | typeof OVER_LIMIT, spec: SpecRange): ReadingResult {
	const min = requireFinite(spec.min, 'The lowest acceptable reading');
	const max = requireFinite(spec.max, 'The highest acceptable reading');
	if (min > max) throw new RangeError('The spec range is upside down: its minimum is above its maximum.');
	if (reading === OVER_LIMIT) return 'open';
	const value = requireFinite(reading, 'The reading');
	if (spec.openAbove !== undefined && value >= requireFinite(spec.openAbove, 'The open threshold')) return 'open';
	if (spec.shortBelow !== undefined && value < requireFinite(spec.shortBelow, 'The short threshold')) return 'short';
	if (value < min) return 'low';
	if (value > max) return 'high';
	return 'pass';
}

/** Output frequency of a synchronous alternator: f = poles × rpm / 120. */
export function outputFrequency(poles: number, rpm: number): number {
	if (!Number.isInteger(poles) || poles < 2 || poles % 2 !== 0 || poles > 1000) {
		throw new RangeError('The number of poles must be an even whole number from 2 to 1000.');
	}
	requireFinite(rpm, 'The speed in rpm');
	if (rpm < 0 || rpm > 1_000_000) throw new RangeError('The speed must be between 0 and 1,000,000 rpm.');
	return (poles * rpm) / 120;
}

/** Engine speed for a wanted frequency: rpm = 120 × f / poles. */
export function speedForFrequency(poles: number, hertz: number): number {
	outputFrequency(poles, 0);
	requireFinite(hertz, 'The frequency');
	if (hertz < 0 || hertz > 100_000) throw new RangeError('The frequency must be between 0 and 100,000 Hz.');
	return (120 * hertz) / poles;
}

function requireWatts(watts: number): number {
	requireFinite(watts, 'The load in watts');
	if (watts < 0 || watts > 1e9) throw new RangeError('The load must be between 0 and 1,000,000,000 W.');
	return watts;
}

/** Current drawn by a resistive load: I = P / V. */
export function currentDraw(watts: number, volts: number): number {
	requireWatts(watts);
	requireFinite(volts, 'The voltage');
	if (volts < 1 || volts > 1e6) throw new RangeError('The voltage must be between 1 and 1,000,000 V.');
	return watts / volts;
}

export type VoltageConfiguration = '120' | '240' | '120/240';

/**
 * Current in each hot leg. On a 120/240 V split-phase unit at full balanced load each leg carries
 * P / 240 (half the load at 120 V on each leg); a 120 V-only or 240 V-only unit carries P / V.
 */
export function currentPerLeg(watts: number, configuration: VoltageConfiguration): number {
	switch (configuration) {
		case '120':
			return currentDraw(watts, 120);
		case '240':
		case '120/240':
			return currentDraw(watts, 240);
		default:
			throw new RangeError('The voltage configuration must be "120", "240" or "120/240".');
	}
}

export interface VoltageRange {
	min: number;
	max: number;
}

export type NominalVoltage = 120 | 240;

/**
 * Service-voltage ranges for 120 V and 240 V nominal, ANSI C84.1 Range A (normal) and Range B
 * (infrequent, tolerable). Written from memory of the standard's tables, not copied from it.
 */
export const serviceVoltageRanges: Record<NominalVoltage, { A: VoltageRange; B: VoltageRange }> = {
	120: { A: { min: 114, max: 126 }, B: { min: 110, max: 127 } },
	240: { A: { min: 228, max: 252 }, B: { min: 220, max: 254 } }
};

export type VoltageBand = 'range-a' | 'range-b' | 'outside';

/** Which service-voltage range a measured voltage falls in (bounds inclusive). */
export function serviceVoltageBand(measured: number, nominal: NominalVoltage): VoltageBand {
	requireFinite(measured, 'The measured voltage');
	const ranges = serviceVoltageRanges[nominal];
	if (!ranges) throw new RangeError('The nominal voltage must be 120 or 240.');
	if (measured >= ranges.A.min && measured <= ranges.A.max) return 'range-a';
	if (measured >= ranges.B.min && measured <= ranges.B.max) return 'range-b';
	return 'outside';
}
