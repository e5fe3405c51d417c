import { QueryTypes } from 'sequelize';
import { db } from './db';
import { SignInAttempt } from './db/models';

// Kept in PostgreSQL so every app instance sees the same counts.
export const WINDOW_MINUTES = 15;
export const MAX_FAILURES_PER_ACCOUNT = Number(process.env.THROTTLE_ACCOUNT_MAX ?? 5);
export const MAX_FAILURES_PER_ADDRESS = Number(process.env.THROTTLE_ADDRESS_MAX ?? 30);

export interface ThrottleVerdict {
	allowed: boolean;
	message?: string;
}

/** Failures since the window opened (for an account: since its last successful sign-in). */
export async function check(email: string, address: string): Promise<ThrottleVerdict> {
	const [row] = await db().query<{ account: number; address: number }>(
		`SELECT
			(SELECT count(*) FROM sign_in_attempts a
			  WHERE lower(a.email) = lower(:email) AND NOT a.succeeded
			    AND a.created_at > now() - make_interval(mins => :window)
			    AND a.created_at > coalesce((SELECT max(created_at) FROM sign_in_attempts s
			                                 WHERE lower(s.email) = lower(:email) AND s.succeeded), '-infinity')
			) AS account,
			(SELECT count(*) FROM sign_in_attempts
			  WHERE address = :address AND NOT succeeded
			    AND created_at > now() - make_interval(mins => :window)) AS address`,
		{ replacements: { email, address, window: WINDOW_MINUTES }, type: QueryTypes.SELECT }
	);
	if (row.account >= MAX_FAILURES_PER_ACCOUNT) {
		return {
			allowed: false,
			message: `Too many failed sign-ins for this account. Wait ${WINDOW_MINUTES} minutes and try again, or ask the shop owner to reset your password.`
		};
	}
	if (row.address >= MAX_FAILURES_PER_ADDRESS) {
		return {
			allowed: false,
			message: `Too many failed sign-ins from this network. Wait ${WINDOW_MINUTES} minutes and try again.`
		};
	}
	return { allowed: true };
}

export async function recordAttempt(email: string, address: string, succeeded: boolean): Promise<void> {
	await SignInAttempt.create({ email: email.slice(0, 254), address: address.slice(0, 100), succeeded });
}
