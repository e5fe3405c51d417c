import type { z } from 'zod';

export type FieldErrors = Record<string, string>;

export type Parsed<T> = { ok: true; data: T } | { ok: false; message: string; errors: FieldErrors };

/** Validates a form against a schema; the first problem per field, keyed by field name. */
export function parseForm<S extends z.ZodType>(schema: S, form: FormData): Parsed<z.infer<S>> {
	const raw: Record<string, unknown> = {};
	for (const [key, value] of form.entries()) {
		if (typeof value !== 'string') continue;
		raw[key] = key in raw ? ([] as unknown[]).concat(raw[key], value) : value;
	}
	return parseObject(schema, raw);
}

export function parseObject<S extends z.ZodType>(schema: S, raw: unknown): Parsed<z.infer<S>> {
	const result = schema.safeParse(raw);
	if (result.success) return { ok: true, data: result.data };
	const errors: FieldErrors = {};
	for (const issue of result.error.issues) {
		const key = issue.path.join('.') || 'form';
		errors[key] ??= issue.message;
	}
	return { ok: false, message: 'Please correct the highlighted fields.', errors };
}

/** The fields to send back to the form so nothing typed is lost (never passwords). */
export function echo(form: FormData, omit: string[] = []): Record<string, string> {
	const out: Record<string, string> = {};
	for (const [key, value] of form.entries()) {
		if (typeof value === 'string' && !omit.includes(key) && !/password/i.test(key)) out[key] = value;
	}
	return out;
}
