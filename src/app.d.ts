import type { RoleName } from '$lib/roles';

declare global {
	namespace App {
		interface Error {
			message: string;
			id?: string;
		}
		interface Locals {
			user: { id: string; shopId: string; role: RoleName; name: string; email: string } | null;
			session: import('lucia').Session | null;
		}
	}
}

export {};
