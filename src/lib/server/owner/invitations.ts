/**
 * Invitations of tooling-owner users. The admin names a customer, a person and an address; the
 * person gets a one-time link (valid 72 h) to set a password, which creates a `customer` account
 * bound to that customer. Only the sha256 of the link's secret is stored, as with API tokens.
 */
import { createHash, randomBytes } from 'node:crypto';
import { writeAudit } from '../audit';
import type { DB } from '../db/connect';
import { writeTransaction } from '../db/write-transaction';
import type { InvitationMailState } from '../db/schema-invitations';
import { nowIso } from '../time';
import { createUser, normaliseEmail, UserInputError } from '../users/users';

export const INVITATION_TTL_HOURS = 72;
const HOUR_MS = 3_600_000;

export function hashInviteToken(token: string): string {
	return createHash('sha256').update(token).digest('hex');
}

/** 256 random bits, URL-safe: the link cannot be guessed, so it needs no throttle. */
function newInviteToken(): string {
	return randomBytes(32).toString('base64url');
}

export type InvitationState = 'open' | 'used' | 'expired' | 'withdrawn';

export function invitationState(
	row: { used_at: string | null; withdrawn_at: string | null; expires_at: string },
	now: string
): InvitationState {
	if (row.used_at) return 'used';
	if (row.withdrawn_at) return 'withdrawn';
	return row.expires_at <= now ? 'expired' : 'open';
}

export type CreateInvitationResult =
	| {
			ok: true;
			id: number;
			token: string;
			expiresAt: string;
			email: string;
			customerName: string;
			replaced: number;
	  }
	| { ok: false; field: 'email' | 'customerId'; message: string };

/**
 * Creates an invitation and returns the link's secret (the only time it exists in clear). An
 * open invitation to the same address is withdrawn, so only the newest link works.
 */
export async function createInvitation(
	db: DB,
	input: { customerId: number; name: string; email: string; invitedBy: string },
	now = nowIso()
): Promise<CreateInvitationResult> {
	const email = normaliseEmail(input.email);
	return writeTransaction(db, async (trx) => {
		const customer = await trx
			.selectFrom('customers')
			.select(['id', 'name'])
			.where('id', '=', input.customerId)
			.executeTakeFirst();
		if (!customer)
			return { ok: false, field: 'customerId', message: 'Choose the customer.' } as const;
		const user = await trx
			.selectFrom('users')
			.select('id')
			.where('email', '=', email)
			.executeTakeFirst();
		if (user) {
			return {
				ok: false,
				field: 'email',
				message: `There is already an account for ${email}.`
			} as const;
		}
		const withdrawn = await trx
			.updateTable('invitations')
			.set({ withdrawn_at: now })
			.where('email', '=', email)
			.where('used_at', 'is', null)
			.where('withdrawn_at', 'is', null)
			.where('expires_at', '>', now)
			.executeTakeFirst();
		const token = newInviteToken();
		const expiresAt = new Date(Date.parse(now) + INVITATION_TTL_HOURS * HOUR_MS).toISOString();
		const row = await trx
			.insertInto('invitations')
			.values({
				customer_id: customer.id,
				email,
				name: input.name.trim(),
				token_hash: hashInviteToken(token),
				created_by: input.invitedBy,
				created_at: now,
				expires_at: expiresAt
			})
			.returning('id')
			.executeTakeFirstOrThrow();
		await writeAudit(
			trx,
			{
				userId: input.invitedBy,
				action: 'invitation.create',
				detail: { id: row.id, email, customer: customer.name }
			},
			now
		);
		return {
			ok: true,
			id: row.id,
			token,
			expiresAt,
			email,
			customerName: customer.name,
			replaced: Number(withdrawn.numUpdatedRows)
		} as const;
	});
}

/** A fresh link for an invitation that was not used: the old link stops working. */
export async function renewInvitation(db: DB, id: number, actorId: string, now = nowIso()) {
	return writeTransaction(db, async (trx) => {
		const row = await trx
			.selectFrom('invitations')
			.innerJoin('customers', 'customers.id', 'invitations.customer_id')
			.select([
				'invitations.id',
				'invitations.email',
				'invitations.name',
				'invitations.used_at',
				'customers.name as customerName'
			])
			.where('invitations.id', '=', id)
			.executeTakeFirst();
		if (!row) return { ok: false, message: 'There is no such invitation.' } as const;
		if (row.used_at)
			return { ok: false, message: `${row.email} has already set a password.` } as const;
		const token = newInviteToken();
		const expiresAt = new Date(Date.parse(now) + INVITATION_TTL_HOURS * HOUR_MS).toISOString();
		await trx
			.updateTable('invitations')
			.set({
				token_hash: hashInviteToken(token),
				expires_at: expiresAt,
				withdrawn_at: null,
				mail_state: 'pending',
				mail_error: null
			})
			.where('id', '=', id)
			.execute();
		await writeAudit(
			trx,
			{ userId: actorId, action: 'invitation.renew', detail: { id, email: row.email } },
			now
		);
		return {
			ok: true,
			id,
			token,
			expiresAt,
			email: row.email,
			name: row.name,
			customerName: row.customerName
		} as const;
	});
}

export async function withdrawInvitation(db: DB, id: number, actorId: string, now = nowIso()) {
	return writeTransaction(db, async (trx) => {
		const res = await trx
			.updateTable('invitations')
			.set({ withdrawn_at: now })
			.where('id', '=', id)
			.where('used_at', 'is', null)
			.where('withdrawn_at', 'is', null)
			.executeTakeFirst();
		if (Number(res.numUpdatedRows) !== 1) return false;
		await writeAudit(trx, { userId: actorId, action: 'invitation.withdraw', detail: { id } }, now);
		return true;
	});
}

/** Records how sending the invitation went, so the admin sees a failed mail. */
export async function recordInvitationMail(
	db: DB,
	id: number,
	state: Exclude<InvitationMailState, 'pending'>,
	error: string | null,
	now = nowIso()
) {
	await db
		.updateTable('invitations')
		.set({ mail_state: state, mail_error: error?.slice(0, 500) ?? null, mailed_at: now })
		.where('id', '=', id)
		.execute();
}

/** Invitations for the admin list, newest first, with their state as of `now`. */
export async function listInvitations(db: DB, now = nowIso(), limit = 200) {
	const rows = await db
		.selectFrom('invitations')
		.innerJoin('customers', 'customers.id', 'invitations.customer_id')
		.leftJoin('users as inviter', 'inviter.id', 'invitations.created_by')
		.select([
			'invitations.id',
			'invitations.email',
			'invitations.name',
			'invitations.created_at',
			'invitations.expires_at',
			'invitations.used_at',
			'invitations.withdrawn_at',
			'invitations.mail_state',
			'invitations.mail_error',
			'invitations.mailed_at',
			'customers.name as customerName',
			'inviter.name as invitedBy'
		])
		.orderBy('invitations.id', 'desc')
		.limit(limit)
		.execute();
	return rows.map((r) => ({ ...r, state: invitationState(r, now) }));
}

/** What the link's page may show: the person and customer only while the link is open. */
export async function findInvitationByToken(db: DB, token: string, now = nowIso()) {
	if (!token || token.length > 100) return undefined;
	const row = await db
		.selectFrom('invitations')
		.innerJoin('customers', 'customers.id', 'invitations.customer_id')
		.select([
			'invitations.id',
			'invitations.email',
			'invitations.name',
			'invitations.expires_at',
			'invitations.used_at',
			'invitations.withdrawn_at',
			'customers.name as customerName'
		])
		.where('invitations.token_hash', '=', hashInviteToken(token))
		.executeTakeFirst();
	if (!row) return undefined;
	const state = invitationState(row, now);
	return state === 'open'
		? {
				state,
				email: row.email,
				name: row.name,
				customerName: row.customerName,
				expiresAt: row.expires_at
			}
		: { state };
}

export type AcceptResult =
	| { ok: true; userId: string }
	| { ok: false; reason: InvitationState | 'unknown' | 'account_exists'; message: string };

const REFUSALS: Record<Exclude<InvitationState, 'open'> | 'unknown', string> = {
	unknown: 'This invitation link is not valid. Ask the plant for a new one.',
	used: 'This invitation link has already been used. Sign in with the password you set.',
	expired: 'This invitation link has expired. Ask the plant to send you a new one.',
	withdrawn:
		'This invitation link was withdrawn or replaced by a newer one. Use the newest e-mail, or ask the plant.'
};

export const refusalMessage = (state: Exclude<InvitationState, 'open'> | 'unknown') =>
	REFUSALS[state];

/**
 * Uses the link: creates the `customer` user with the chosen password and marks the invitation
 * used, in one transaction, so a link works once even when submitted twice at the same moment.
 */
export async function acceptInvitation(
	db: DB,
	token: string,
	password: string,
	now = nowIso()
): Promise<AcceptResult> {
	if (!token || token.length > 100)
		return { ok: false, reason: 'unknown', message: REFUSALS.unknown };
	try {
		return await writeTransaction(db, async (trx) => {
			const row = await trx
				.selectFrom('invitations')
				.selectAll()
				.where('token_hash', '=', hashInviteToken(token))
				.executeTakeFirst();
			if (!row) return { ok: false, reason: 'unknown', message: REFUSALS.unknown } as const;
			const state = invitationState(row, now);
			if (state !== 'open') return { ok: false, reason: state, message: REFUSALS[state] } as const;
			const userId = await createUser(trx, {
				email: row.email,
				name: row.name,
				role: 'customer',
				customerId: row.customer_id,
				password
			});
			const res = await trx
				.updateTable('invitations')
				.set({ used_at: now, user_id: userId })
				.where('id', '=', row.id)
				.where('used_at', 'is', null)
				.executeTakeFirst();
			// Somebody else used it in between: undo the account created above.
			if (Number(res.numUpdatedRows) !== 1) throw new InvitationRace();
			await writeAudit(
				trx,
				{ userId, action: 'invitation.accept', detail: { id: row.id, email: row.email } },
				now
			);
			return { ok: true, userId } as const;
		});
	} catch (error) {
		if (error instanceof InvitationRace) {
			return { ok: false, reason: 'used', message: REFUSALS.used };
		}
		if (error instanceof UserInputError && error.field === 'email') {
			return {
				ok: false,
				reason: 'account_exists',
				message:
					'There is already an account for this address. Sign in instead, or ask the plant to reset your password.'
			};
		}
		throw error;
	}
}

class InvitationRace extends Error {}

const domainOf = (email: string | null | undefined) =>
	email?.trim().toLowerCase().split('@')[1] || null;

/**
 * The e-mail domains a customer is known by: its contact address and its portal users' addresses.
 * An invitation to any other domain may be a typo or the wrong company, so it is confirmed first.
 */
export async function knownCustomerDomains(db: DB, customerId: number): Promise<string[]> {
	const [customer, users] = await Promise.all([
		db
			.selectFrom('customers')
			.select('contact_email')
			.where('id', '=', customerId)
			.executeTakeFirst(),
		db.selectFrom('users').select('email').where('customer_id', '=', customerId).execute()
	]);
	const domains = [customer?.contact_email, ...users.map((u) => u.email)].map(domainOf);
	return [...new Set(domains.filter((d): d is string => d !== null))].sort();
}

/** A sentence asking to confirm an invitation outside the known domains, or null when none is needed. */
export async function inviteDomainQuestion(
	db: DB,
	customerId: number,
	email: string
): Promise<string | null> {
	const known = await knownCustomerDomains(db, customerId);
	const domain = domainOf(email);
	if (known.length === 0 || (domain && known.includes(domain))) return null;
	return `${domain ?? email} is not among this customer's known e-mail domains (${known.join(', ')}). Check the address; tick the box and send again if it is right.`;
}
