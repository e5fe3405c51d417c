import { hash, verify } from '@node-rs/argon2';

// argon2id (the library's default algorithm) with OWASP's minimum: 19 MiB, 2 passes, 1 lane.
const options = { memoryCost: 19456, timeCost: 2, parallelism: 1, outputLen: 32 };

export const MIN_PASSWORD_LENGTH = 10;

export function hashPassword(password: string): Promise<string> {
	return hash(password, options);
}

export async function verifyPassword(stored: string, password: string): Promise<boolean> {
	try {
		return await verify(stored, password);
	} catch {
		return false;
	}
}

// Verifying against a throwaway hash keeps "no such account" as slow as "wrong password".
let decoy: Promise<string> | undefined;
export async function burnVerification(password: string): Promise<void> {
	decoy ??= hash('decoy-password-for-timing', options);
	await verifyPassword(await decoy, password);
}
