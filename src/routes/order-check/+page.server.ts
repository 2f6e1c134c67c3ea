import { setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import {
	DEFAULT_SCRAP_PCT,
	orderCheckQuerySchema,
	toUtcIso,
	type OrderCheckQuery
} from '$lib/schemas/schedule';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { runOrderCheck } from '$lib/server/schedule/order-check';
import { listPressOptions } from '$lib/server/schedule/presses';
import type { PageServerLoad } from './$types';

/** "Book this": the booking form filled in with the question just checked. */
function bookThisHref(q: OrderCheckQuery, press: string) {
	const params = new URLSearchParams({
		die: q.die,
		parts: String(q.parts),
		scrapPct: String(q.scrapPct)
	});
	if (press) params.set('press', press);
	if (q.shotsPerHour !== undefined) params.set('shotsPerHour', String(q.shotsPerHour));
	if (q.from) params.set('start', q.from);
	return `/bookings/new?${params}`;
}

// A GET form: the question stays in the URL, so a check can be bookmarked or sent on.
export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, 'scheduler', 'admin', 'toolroom_lead');
	const db = getDb();
	const asked = event.url.searchParams.has('parts');
	const [form, presses] = await Promise.all([
		asked
			? superValidate(event.url, zod4(orderCheckQuerySchema))
			: superValidate(
					{
						die: (event.url.searchParams.get('die') ?? '').toUpperCase().slice(0, 20),
						scrapPct: DEFAULT_SCRAP_PCT
					},
					zod4(orderCheckQuerySchema),
					{ errors: false }
				),
		listPressOptions(db)
	]);
	let answer = null;
	let bookHref: string | null = null;
	if (asked && form.valid) {
		if (!form.data.die) {
			setError(form, 'die', 'Enter the die number, e.g. D-0107.');
		} else {
			const q = form.data;
			const result = await runOrderCheck(
				db,
				{
					die: q.die,
					parts: q.parts,
					scrapPct: q.scrapPct,
					shotsPerHour: q.shotsPerHour ?? null,
					press: q.press || null,
					startsAt: q.from ? toUtcIso(q.from) : null
				},
				{ customerId: null },
				undefined,
				user.unitSystem
			);
			if (result.ok) {
				answer = result.answer;
				bookHref = bookThisHref(q, answer.press?.name ?? '');
			} else setError(form, result.field, result.message);
		}
	}
	return { form, presses, answer, bookHref, unitSystem: user.unitSystem };
};
