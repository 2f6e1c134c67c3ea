import { formatShots } from '../../format';
import type { EntryChangeForm } from '../../schemas/shots';
import type { DB } from '../db/connect';
import {
	confirmShotEntry,
	correctShotEntry,
	voidShotEntry,
	type EntryChangeResult,
	type LedgerActor
} from './ledger';

export type EntryChangeAnswer =
	{ ok: true; message: string } | { ok: false; field: string; message: string };

/** The die page's "change an entry" form to a ledger action: confirm, correct or void. */
export async function changeShotEntry(
	db: DB,
	dieNumber: string,
	form: EntryChangeForm,
	actor: LedgerActor
): Promise<EntryChangeAnswer> {
	let result: EntryChangeResult;
	if (form.action === 'confirm') {
		result = await confirmShotEntry(db, dieNumber, form.entry, form.reason, actor);
	} else if (form.action === 'void') {
		result = await voidShotEntry(db, dieNumber, form.entry, form.reason, actor);
	} else {
		const byCounter = form.counterStart !== undefined && form.counterEnd !== undefined;
		result = await correctShotEntry(
			db,
			dieNumber,
			form.entry,
			{
				shots: form.shots,
				countedAt: form.countedAt || undefined,
				...(byCounter ? { counterStart: form.counterStart, counterEnd: form.counterEnd } : {}),
				// Typed shots without counters replace counter readings (they no longer add up).
				...(!byCounter && form.shots !== undefined ? { counterStart: null, counterEnd: null } : {})
			},
			form.reason,
			actor
		);
	}
	if (!result.ok) {
		// A refusal of the corrected figures names the field the form shows.
		const field = result.field === 'confirm' ? 'shots' : result.field;
		return { ok: false, field, message: result.message };
	}
	const total = `Die total now ${formatShots(result.dieTotal)}.`;
	const done = {
		confirm: 'Entry confirmed; it leaves the review list.',
		correct: 'Entry corrected: the old one is voided and the corrected one counted.',
		void: 'Entry voided: it stays in the ledger, struck through, and counts nothing.'
	}[form.action];
	return { ok: true, message: `${done} ${total}` };
}
