// Tables of the invitations area; added to the Database interface in schema.ts.
// Dates are ISO-8601 text in UTC (see schema.ts).
import type { Generated, Selectable } from 'kysely';

export type InvitationMailState = 'pending' | 'sent' | 'failed';

export interface InvitationsTable {
	id: Generated<number>;
	/** The customer the new `customer` user will be bound to. */
	customer_id: number;
	/** Lower-cased address the link went to; also the new account's e-mail. */
	email: string;
	name: string;
	/** sha256 hex of the one-time link's secret; the secret itself is never stored. */
	token_hash: string;
	created_by: string | null;
	created_at: string;
	expires_at: string;
	/** Set together with user_id when the link was used to create the account. */
	used_at: string | null;
	user_id: string | null;
	withdrawn_at: string | null;
	mail_state: Generated<InvitationMailState>;
	/** Why the last send failed, for the admin. */
	mail_error: string | null;
	mailed_at: string | null;
}

export interface InvitationsTables {
	invitations: InvitationsTable;
}

export type Invitation = Selectable<InvitationsTable>;
