import { json } from '@sveltejs/kit';
import type { RequestHandler } from './$types';

// Public, no database: the floor the benchmarks compare real routes against.
export const GET: RequestHandler = () => json({ ok: true });
