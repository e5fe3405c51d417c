import { describe, expect, it } from 'vitest';
import { parseJson } from './json';

describe('parseJson', () => {
	it('turns a lone half of a UTF-16 pair into U+FFFD, in values and keys, and keeps whole pairs', () => {
		const value = parseJson('{"caption":"Rotor \\ud800 lead","\\udc00key":["\\ud83d\\ude00", "ok"]}');
		expect(value).toEqual({ caption: 'Rotor \ufffd lead', '\ufffdkey': ['😀', 'ok'] });
		// Well-formed text survives the round trip PostgreSQL's jsonb makes of it.
		expect(JSON.stringify(value)).not.toMatch(/\\ud[89a-f]/i);
	});

	it('leaves a "__proto__" key an own property, as JSON.parse does, and the prototype alone', () => {
		const value = parseJson('{"__proto__":{"shopId":"someone else"},"n":1}') as Record<string, unknown>;
		expect(Object.getPrototypeOf(value)).toBe(Object.prototype);
		expect(value.shopId).toBeUndefined();
		expect(Object.keys(value)).toEqual(['__proto__', 'n']);
	});

	it('fails on text that is not JSON, as JSON.parse does', () => {
		expect(() => parseJson('{"caption":')).toThrow(SyntaxError);
		expect(parseJson('null')).toBeNull();
		expect(parseJson('12.5')).toBe(12.5);
	});
});
