import { Lucia, TimeSpan, type Adapter, type DatabaseSession, type DatabaseUser } from 'lucia';
import type { DB } from '../db/connect';
import type { Role } from '../db/schema';

/** Lucia's storage, written over Kysely so sessions live in the same SQLite file as the rest. */
export function createKyselyAdapter(db: DB): Adapter {
	const toSession = (row: {
		id: string;
		user_id: string;
		expires_at: number;
	}): DatabaseSession => ({
		id: row.id,
		userId: row.user_id,
		expiresAt: new Date(row.expires_at),
		attributes: {}
	});
	return {
		async getSessionAndUser(sessionId) {
			const row = await db
				.selectFrom('sessions')
				.innerJoin('users', 'users.id', 'sessions.user_id')
				.select([
					'sessions.id',
					'sessions.user_id',
					'sessions.expires_at',
					'users.email',
					'users.name',
					'users.role',
					'users.customer_id',
					'users.active',
					'users.unit_system',
					'users.must_change_password'
				])
				.where('sessions.id', '=', sessionId)
				.executeTakeFirst();
			if (!row) return [null, null];
			const user: DatabaseUser = {
				id: row.user_id,
				attributes: {
					email: row.email,
					name: row.name,
					role: row.role,
					customer_id: row.customer_id,
					active: row.active,
					unit_system: row.unit_system,
					must_change_password: row.must_change_password
				}
			};
			return [toSession(row), user];
		},
		async getUserSessions(userId) {
			const rows = await db
				.selectFrom('sessions')
				.selectAll()
				.where('user_id', '=', userId)
				.execute();
			return rows.map(toSession);
		},
		async setSession(session) {
			await db
				.insertInto('sessions')
				.values({
					id: session.id,
					user_id: session.userId,
					expires_at: session.expiresAt.getTime()
				})
				.execute();
		},
		async updateSessionExpiration(sessionId, expiresAt) {
			await db
				.updateTable('sessions')
				.set({ expires_at: expiresAt.getTime() })
				.where('id', '=', sessionId)
				.execute();
		},
		async deleteSession(sessionId) {
			await db.deleteFrom('sessions').where('id', '=', sessionId).execute();
		},
		async deleteUserSessions(userId) {
			await db.deleteFrom('sessions').where('user_id', '=', userId).execute();
		},
		async deleteExpiredSessions() {
			await db.deleteFrom('sessions').where('expires_at', '<=', Date.now()).execute();
		}
	};
}

export function createLucia(db: DB, secureCookies: boolean) {
	return new Lucia(createKyselyAdapter(db), {
		sessionExpiresIn: new TimeSpan(12, 'h'),
		sessionCookie: {
			name: 'castellan_session',
			attributes: { secure: secureCookies, sameSite: 'lax' }
		},
		getUserAttributes: (a) => ({
			email: a.email,
			name: a.name,
			role: a.role,
			customerId: a.customer_id,
			active: a.active === 1,
			unitSystem: a.unit_system,
			mustChangePassword: a.must_change_password === 1
		})
	});
}

export type CastellanLucia = ReturnType<typeof createLucia>;

declare module 'lucia' {
	interface Register {
		Lucia: CastellanLucia;
		DatabaseUserAttributes: {
			email: string;
			name: string;
			role: Role;
			customer_id: number | null;
			active: number;
			unit_system: 'metric' | 'us';
			must_change_password: number;
		};
	}
}
