import { describe, expect, it } from 'vitest';
import { decimalString, plainAmount } from './validators';

describe('amounts as people type them', () => {
	it('drop a leading currency sign and commas that group thousands', () => {
		expect(plainAmount('$649')).toBe('649');
		expect(plainAmount(' 1,149.00 ')).toBe('1149.00');
		expect(plainAmount('€ 12,500.5')).toBe('12500.5');
		expect(plainAmount('-$1,000')).toBe('-1000');
	});

	it('leave anything else for the check to refuse, rather than guess', () => {
		expect(plainAmount('1,5')).toBe('1,5');
		expect(plainAmount('12,50.00')).toBe('12,50.00');
		const price = decimalString('Price paid');
		expect(price.safeParse('1,5').success).toBe(false);
		expect(price.safeParse('$1,149.00')).toMatchObject({ success: true, data: '1149.00' });
		expect(price.safeParse('89').data).toBe('89.00');
	});
});
