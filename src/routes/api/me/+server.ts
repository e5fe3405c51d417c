import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { STAFF } from '$lib/roles';
import { requireRole } from '$lib/server/auth/guard';

export const GET: RequestHandler = () => {
	const user = requireRole(STAFF);
	return json({ id: user.id, name: user.name, email: user.email, role: user.role, shopId: user.shopId });
};
