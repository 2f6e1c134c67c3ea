import type { Session, User } from 'lucia';

declare global {
	namespace App {
		interface Error {
			message: string;
		}
		interface Locals {
			user: (User & { id: string }) | null;
			session: Session | null;
			/** The request came with a session cookie whose session has ended (expired, signed out). */
			sessionEnded?: boolean;
		}
	}
}

export {};
