import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';
import { db } from '$lib/server/db';

// Public and bodiless on purpose: a load balancer asks whether this instance can reach the database.
export const GET: RequestHandler = async () => {
	try {
		await db().query('SELECT 1');
		return json({ status: 'ok' });
	} catch {
		return json({ status: 'database unreachable' }, { status: 503 });
	}
};
