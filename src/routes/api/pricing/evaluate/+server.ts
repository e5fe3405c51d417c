import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { hideCosts } from '$lib/components/quote/costs';
import { evaluateRequest } from '$lib/pricing/evaluate';
import { settingsToJson } from '$lib/pricing/settings';
import { STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import { readJson } from '$lib/server/json';
import * as settings from '$lib/server/settings';

/**
 * Prices a request with the shop's settings; every figure comes back as a decimal string. Roles the
 * shop keeps from costs get the result without costs, margins and markups.
 */
export const POST: RequestHandler = async ({ request }) => {
	const user = requireRole(STAFF);
	const body = await readJson(request);
	if (!body.ok) return json({ message: body.message, issues: [{ path: '', message: body.message }] }, { status: 400 });
	const shop = await settings.get(user.shopId);
	const outcome = evaluateRequest(body.value, settingsToJson(shop.pricing));
	if (!outcome.ok) return json({ message: outcome.message, issues: outcome.issues }, { status: 400 });
	return json(settings.seesCosts(user.role, shop) ? outcome.result : hideCosts(outcome.result));
};
