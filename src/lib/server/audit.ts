import { sql, type Kysely } from 'kysely';
import { startsWithText } from './db/portable';
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

export interface AuditRow {
	id: number;
	at: string;
	/** Who: a user's name and e-mail, an API token's name, or the system. */
	who: string;
	action: string;
	die: string | null;
	/** The change as "field: before → after" lines when the entry carries before and after. */
	changes: string[];
	/** Any other detail, as compact JSON. */
	detail: string;
}

const show = (v: unknown) => (v === null || v === undefined || v === '' ? '—' : String(v));

/** "field: before → after" lines for an entry's `before` and `after` objects. */
export function describeChanges(detail: Record<string, unknown>): string[] {
	const before = detail.before as Record<string, unknown> | undefined;
	const after = detail.after as Record<string, unknown> | undefined;
	if (!before || !after || typeof before !== 'object' || typeof after !== 'object') return [];
	const keys = [...new Set([...Object.keys(before), ...Object.keys(after)])];
	return keys
		.filter((k) => JSON.stringify(before[k]) !== JSON.stringify(after[k]))
		.map((k) => `${k}: ${show(before[k])} → ${show(after[k])}`);
}

function parseDetail(text: string): Record<string, unknown> {
	try {
		const value: unknown = JSON.parse(text);
		return value && typeof value === 'object' ? (value as Record<string, unknown>) : { value };
	} catch {
		return { text };
	}
}

/** The audit log, newest first, a page at a time (for /admin/audit). */
export async function listAudit(
	db: Kysely<Database>,
	query: { page: number; size: number; action?: string }
): Promise<{ rows: AuditRow[]; total: number }> {
	const base = db
		.selectFrom('audit_log')
		.$if(!!query.action, (q) => q.where(startsWithText(db, sql`audit_log.action`, query.action!)));
	const [rows, count] = await Promise.all([
		base
			.leftJoin('users', 'users.id', 'audit_log.user_id')
			.leftJoin('api_tokens', 'api_tokens.id', 'audit_log.token_id')
			.leftJoin('dies', 'dies.id', 'audit_log.die_id')
			.select([
				'audit_log.id',
				'audit_log.at',
				'audit_log.action',
				'audit_log.detail',
				'users.name as userName',
				'users.email as userEmail',
				'api_tokens.name as tokenName',
				'dies.number as dieNumber'
			])
			.orderBy('audit_log.at', 'desc')
			.orderBy('audit_log.id', 'desc')
			.limit(query.size)
			.offset((query.page - 1) * query.size)
			.execute(),
		base.select((eb) => eb.fn.countAll<number>().as('n')).executeTakeFirstOrThrow()
	]);
	return {
		total: Number(count.n),
		rows: rows.map((r) => {
			const detail = parseDetail(r.detail);
			const changes = describeChanges(detail);
			const rest = Object.fromEntries(
				Object.entries(detail).filter(
					([k]) => !(changes.length && (k === 'before' || k === 'after'))
				)
			);
			return {
				id: r.id,
				at: r.at,
				who: r.userName
					? `${r.userName} (${r.userEmail})`
					: r.tokenName
						? `API token “${r.tokenName}”`
						: 'Castellan',
				action: r.action,
				die: r.dieNumber,
				changes,
				detail: Object.keys(rest).length ? JSON.stringify(rest) : ''
			};
		})
	};
}
