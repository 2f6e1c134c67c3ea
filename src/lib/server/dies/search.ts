/** The header's die search: what people type, resolved to one die when it names exactly one. */
import type { DB } from '../db/connect';
import { compactCode, normaliseDieNumber } from '../../calc/die-number';
import { COMPACT_PART_NUMBER, listDies, type DieScope } from './register';
import { dieListQuerySchema } from '../../schemas/die';

/**
 * The die number to open for a typed search, or null when it names none or several.
 * A die number however typed (`d 138`, `D0138`) wins; then an exact part number (dashes and
 * spaces ignored); then a search with exactly one hit.
 */
export async function findSingleDie(
	db: DB,
	typed: string,
	scope: DieScope
): Promise<string | null> {
	const q = typed.trim();
	if (!q) return null;
	const number = normaliseDieNumber(q);
	const scoped = db
		.selectFrom('dies')
		.select('dies.number')
		.$if(scope.customerId !== null, (b) => b.where('dies.customer_id', '=', scope.customerId!));
	const exact = await scoped
		.where((eb) =>
			eb.or([
				eb('dies.number', '=', q.toUpperCase()),
				...(number ? [eb('dies.number', '=', number)] : [])
			])
		)
		.execute();
	if (exact.length === 1) return exact[0].number;
	const compact = compactCode(q);
	if (compact) {
		const byPart = await scoped.where(COMPACT_PART_NUMBER, '=', compact).limit(2).execute();
		if (byPart.length === 1) return byPart[0].number;
	}
	const list = await listDies(db, dieListQuerySchema.parse({ q, size: 10 }), scope);
	return list.total === 1 ? list.rows[0].number : null;
}
