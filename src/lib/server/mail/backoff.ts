// When a failed send is tried again. Pure: no clock, no database; the worker passes a random number.

export const RETRY_BASE_MS = 5_000;
export const RETRY_FACTOR = 3;
export const RETRY_CAP_MS = 10 * 60_000;
/** Attempts before a message is marked failed: 5 s, 15 s, 45 s … then every 10 min, about 2.6 h in all. */
export const MAX_ATTEMPTS = 20;
/** Each delay is spread ±20% (then capped) so instances that failed together do not retry in lockstep. */
export const JITTER = 0.2;

/**
 * Milliseconds to wait after the `attempt`-th failed attempt (1-based): exponential backoff with
 * jitter, capped (common practice, no source). `random` is in [0, 1).
 */
export function retryDelay(attempt: number, random: number): number {
	const exponent = Math.max(0, Math.min(attempt - 1, 30));
	const plain = Math.min(RETRY_BASE_MS * RETRY_FACTOR ** exponent, RETRY_CAP_MS);
	const spread = 1 - JITTER + 2 * JITTER * Math.min(Math.max(random, 0), 1);
	return Math.round(Math.min(plain * spread, RETRY_CAP_MS));
}

export type Failure = 'retry' | 'give-up';

/**
 * What to do after a failed attempt. SMTP replies in the 5xx range to the envelope or the message
 * are permanent (RFC 5321 §4.2.1), so retrying cannot help; everything else is retried until
 * MAX_ATTEMPTS.
 */
export function afterFailure(attempts: number, error: { code?: string; responseCode?: number }): Failure {
	const permanent =
		typeof error.responseCode === 'number' &&
		error.responseCode >= 500 &&
		error.responseCode < 600 &&
		(error.code === 'EENVELOPE' || error.code === 'EMESSAGE');
	if (permanent) return 'give-up';
	return attempts >= MAX_ATTEMPTS ? 'give-up' : 'retry';
}

/** nodemailer's codes for "the SMTP server is unreachable", as opposed to "this message is unwelcome". */
export const CONNECTION_CODES: readonly string[] = ['ECONNECTION', 'ETIMEDOUT', 'ESOCKET', 'EDNS', 'ETLS', 'EPROXY'];

export function isConnectionFailure(error: { code?: string; responseCode?: number }): boolean {
	return CONNECTION_CODES.includes(error.code ?? '') && !error.responseCode;
}
