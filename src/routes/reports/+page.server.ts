import type { PageServerLoad } from './$types';
import { UNIT_KINDS, UNIT_KIND_LABELS } from '$lib/domain';
import { MANAGERS } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';
import * as reports from '$lib/server/reports';
import * as settings from '$lib/server/settings';

export const load: PageServerLoad = async ({ url }) => {
	const user = requireRole(MANAGERS);
	const parsed = reports.parseFilters(url.searchParams);
	const [technicians, shop] = await Promise.all([reports.technicianChoices(user.shopId), settings.get(user.shopId)]);
	const typed = Object.fromEntries(['from', 'to', 'technician', 'kind'].map((k) => [k, url.searchParams.get(k) ?? '']));
	const fallback = reports.parseFilters(new URLSearchParams());
	return {
		reports: reports.catalog(),
		currency: shop.currency,
		technicians,
		kinds: UNIT_KINDS.map((kind) => ({ value: kind, label: UNIT_KIND_LABELS[kind] })),
		filters: parsed.ok ? parsed.filters : null,
		defaults: fallback.ok ? fallback.filters : null,
		typed,
		message: parsed.ok ? null : parsed.message,
		errors: parsed.ok ? {} : Object.fromEntries(parsed.issues.map((i) => [i.path, i.message]))
	};
};
