import type { Kysely } from 'kysely';
import type { Database } from './db/schema';
import { nowIso } from './time';

export interface AuditEntry {
	userId?: string | null;
	tokenId?: number | null;
	action: string;
	dieId?: number | null;
	detail?: Record<string, unknown>;
}

/** Appends to the audit trail; call inside the transaction that makes the change. */
export async function writeAudit(db: Kysely<Database>, entry: AuditEntry, at = nowIso()) {
	await db
		.insertInto('audit_log')
		.values({
			at,
			user_id: entry.userId ?? null,
			token_id: entry.tokenId ?? null,
			action: entry.action,
			die_id: entry.dieId ?? null,
			detail: JSON.stringify(entry.detail ?? {})
		})
		.execute();
}
