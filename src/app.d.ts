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
			user: { id: number; email: string; name: string; role: Role; mustChangePassword: boolean } | null;
			/** How `user` was established: session cookie, API bearer token, or not at all. */
			authMethod: 'session' | 'token' | null;
		}
		// interface PageData {}
		// interface PageState {}
		// interface Platform {}
	}
}

declare module '@auth/core/jwt' {
	interface JWT {
		/** Our user id; everything else about the person is re-read from the database per request. */
		uid?: number;
	}
}

export {};
