import type { LayoutServerLoad } from './$types';
import { Shop } from '$lib/server/db/models';

export const load: LayoutServerLoad = async ({ locals }) => {
	if (!locals.user) return { user: null };
	const shop = await Shop.findByPk(locals.user.shopId, { attributes: ['name'] });
	return {
		user: { name: locals.user.name, role: locals.user.role, shopName: shop?.name ?? '' }
	};
};
