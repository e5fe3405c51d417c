import { fail } from '@sveltejs/kit';
import { UserError } from './errors';
import type { FieldErrors } from './forms';

/** Runs a form action's work; a UserError becomes a 400 with its message (and field). */
export async function attempt<T>(work: () => Promise<T>, echoed: Record<string, unknown> = {}) {
	try {
		return { ok: true as const, value: await work() };
	} catch (e) {
		if (e instanceof UserError) {
			return {
				ok: false as const,
				failure: fail(400, { message: e.message, errors: (e.field ? { [e.field]: e.message } : {}) as FieldErrors, ...echoed })
			};
		}
		throw e;
	}
}
