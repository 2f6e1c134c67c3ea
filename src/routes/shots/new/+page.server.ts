import { fail, redirect } from '@sveltejs/kit';
import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { pressRunSchema, pressRunShots } from '$lib/schemas/shots';
import { toPlantInput } from '$lib/plant-time';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { findDieShotSummary } from '$lib/server/shots/die-summary';
import { recordShots } from '$lib/server/shots/ledger';
import { listActiveDieChoices, listPresses } from '$lib/server/shots/ledger-list';
import { SHOT_RECORDERS } from '$lib/roles';
import type { Actions, PageServerLoad } from './$types';

const nowLocal = () => toPlantInput(Date.now());
function wholeNumber(v: string | null): number | undefined {
	return v !== null && /^\d{1,12}$/.test(v.trim()) ? Number(v.trim()) : undefined;
}

// Fields a GET "Look up" carries back, so nothing typed is lost when the page reloads.
export const load: PageServerLoad = async (event) => {
	requireRole(event, ...SHOT_RECORDERS);
	const db = getDb();
	const p = event.url.searchParams;
	const die = (p.get('die') ?? '').trim().toUpperCase().slice(0, 20);
	const [dies, presses, summary] = await Promise.all([
		listActiveDieChoices(db),
		listPresses(db),
		die ? findDieShotSummary(db, die) : Promise.resolve(null)
	]);
	const counted = wholeNumber(p.get('counted'));
	const form = await superValidate(
		{
			die,
			machine: p.get('machine') || summary?.lastPress || '',
			countedAt: (counted === undefined && p.get('countedAt')) || nowLocal(),
			shots: counted === undefined ? wholeNumber(p.get('shots')) : undefined,
			counterStart: counted === undefined ? wholeNumber(p.get('counterStart')) : undefined,
			counterEnd: counted === undefined ? wholeNumber(p.get('counterEnd')) : undefined,
			note: counted === undefined ? (p.get('note') ?? '').slice(0, 500) : ''
		},
		zod4(pressRunSchema),
		{ errors: false }
	);
	return { form, dies, presses, summary, lookedUp: die, counted };
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireRole(event, ...SHOT_RECORDERS);
		const form = await superValidate(event.request, zod4(pressRunSchema));
		if (!form.valid) return fail(400, { form });
		const d = form.data;
		const shots = pressRunShots(d);
		const byCounter = d.counterStart !== undefined;
		const result = await recordShots(
			getDb(),
			[
				{
					die: d.die,
					shots,
					countedAt: d.countedAt,
					machine: d.machine,
					counterStart: d.counterStart ?? null,
					counterEnd: d.counterEnd ?? null,
					note: d.note,
					resetReason: d.resetReason,
					confirmReason: d.confirmReason
				}
			],
			{ userId: user.id, tokenId: null, customerId: null },
			{ source: 'manual' }
		);
		if (!result.ok) {
			for (const issue of result.issues) {
				// A count typed as counter readings is answered beside the counter end.
				const field =
					issue.field === 'shots' && byCounter
						? 'counterEnd'
						: issue.field === 'confirm'
							? 'confirmReason'
							: issue.field;
				const known = [
					'die',
					'machine',
					'countedAt',
					'shots',
					'counterStart',
					'counterEnd',
					'note',
					'resetReason',
					'confirmReason'
				];
				setError(form, (known.includes(field) ? field : '') as 'die', issue.message);
			}
			return fail(400, { form });
		}
		redirect(303, `/shots/new?die=${encodeURIComponent(d.die)}&counted=${shots}`);
	}
};
