import { fail, type RequestEvent } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { voidRecordSchema } from '../../schemas/toolroom';
import { requireRole } from '../auth/guard';
import { getDb } from '../db';
import type { DB } from '../db/connect';
import { loadPlantDie } from '../dies/load-die';
import { TOOLROOM_LEADS } from './access';
import type { Actor } from './jobs';

type VoidOutcome = { ok: true } | { ok: false; status: number; message: string; field?: string };

/**
 * The form action that voids one record of the die (an inspection, a cooling check): toolroom
 * lead only, a reason required, the record chosen by id. `voidRecord` is the area's own void
 * function; `done` is the sentence shown after it.
 */
export function voidRecordAction(
	formId: string,
	voidRecord: (
		db: DB,
		input: { dieId: number; id: number; reason: string; actor: Actor }
	) => Promise<VoidOutcome>,
	done: string
) {
	return async (event: RequestEvent<{ number: string }>) => {
		const user = requireRole(event, ...TOOLROOM_LEADS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(voidRecordSchema), { id: formId });
		if (!form.valid) return fail(400, { voidForm: form });
		const result = await voidRecord(getDb(), {
			dieId: die.id,
			id: form.data.id,
			reason: form.data.reason,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) {
			const field = result.field === 'reason' ? 'reason' : 'id';
			return setError(form, field, result.message, { status: result.status as 400 });
		}
		return message(form, done);
	};
}
