import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { evaluateRequest } from '$lib/pricing/evaluate';
import { STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import { readJson } from '$lib/server/json';
import * as settings from '$lib/server/settings';

/** Prices a request with the shop's settings; every figure comes back as a decimal string. */
export const POST: RequestHandler = async ({ request }) => {
	const user = requireRole(STAFF);
	const body = await readJson(request);
	if (!body.ok) return json({ message: body.message, issues: [{ path: '', message: body.message }] }, { status: 400 });
	const outcome = evaluateRequest(body.value, await settings.pricingOverrides(user.shopId));
	if (!outcome.ok) return json({ message: outcome.message, issues: outcome.issues }, { status: 400 });
	return json(outcome.result);
};
