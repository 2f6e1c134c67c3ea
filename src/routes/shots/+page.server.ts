import { shotListQuerySchema } from '$lib/schemas/shots';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { listPresses, listShotEntries } from '$lib/server/shots/ledger-list';
import { DIE_EDITORS, SHOT_RECORDERS } from '$lib/roles';
import type { PageServerLoad } from './$types';

// The shot ledger of every die, newest first, filtered through the URL.
export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...SHOT_RECORDERS);
	const query = shotListQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const db = getDb();
	const [list, presses] = await Promise.all([listShotEntries(db, query), listPresses(db)]);
	return { query, ...list, presses, canCorrect: DIE_EDITORS.includes(user.role) };
};
