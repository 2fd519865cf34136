// See https://svelte.dev/docs/kit/types#app.d.ts
import type { Role } from '$lib/auth/roles';

declare global {
	namespace App {
		interface Error {
			message: string;
			errorId?: string;
		}
		interface Locals {
			/** The signed-in user, re-read from the database on every request; null when signed out. */
			user: { id: number; email: string; name: string; role: Role } | null;
		}
		// interface PageData {}
		// interface PageState {}
		// interface Platform {}
	}
}

export {};
