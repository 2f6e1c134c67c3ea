import { fail } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { writeAudit } from '$lib/server/audit';
import { getDb } from '$lib/server/db';
import {
	listOutbox,
	outboxHealth,
	resendAllFailed,
	resendDelivery
} from '$lib/server/notices/admin';
import { noticeSchedule, runNoticesNow, sendNoticesSoon } from '$lib/server/notices/cron';
import { NOTICE_LEVEL_LABELS } from '$lib/server/notices/types';
import { outboxQuerySchema, resendSchema } from './schema';
import type { Actions, PageServerLoad } from './$types';

const PAGE_SIZE = 50;

export const load: PageServerLoad = async (event) => {
	requireRole(event, 'admin');
	const query = outboxQuerySchema.parse(Object.fromEntries(event.url.searchParams));
	const db = getDb();
	const [list, health] = await Promise.all([
		listOutbox(db, {
			state: query.state || undefined,
			q: query.q || undefined,
			page: query.page,
			size: PAGE_SIZE
		}),
		outboxHealth(db)
	]);
	return {
		query,
		...list,
		size: PAGE_SIZE,
		health,
		levelLabels: NOTICE_LEVEL_LABELS,
		schedule: noticeSchedule()
	};
};

export const actions: Actions = {
	resend: async (event) => {
		const admin = requireRole(event, 'admin');
		const parsed = resendSchema.safeParse(Object.fromEntries(await event.request.formData()));
		if (!parsed.success) return fail(400, { error: 'No outbox row given.' });
		const db = getDb();
		if (!(await resendDelivery(db, parsed.data.id))) {
			return fail(404, {
				error: 'That row does not exist or has not failed; nothing was changed.'
			});
		}
		await writeAudit(db, {
			userId: admin.id,
			action: 'notice.resend',
			detail: { id: parsed.data.id }
		});
		sendNoticesSoon();
		return { done: 'Queued again; it goes out with the next send.' };
	},
	runNow: async (event) => {
		const admin = requireRole(event, 'admin');
		await runNoticesNow();
		await writeAudit(getDb(), { userId: admin.id, action: 'notice.run_now', detail: {} });
		return { done: 'The notice run finished; new notices are in the list below.' };
	},
	resendFailed: async (event) => {
		const admin = requireRole(event, 'admin');
		const db = getDb();
		const count = await resendAllFailed(db);
		if (count === 0) return fail(400, { error: 'No failed rows to send again.' });
		await writeAudit(db, { userId: admin.id, action: 'notice.resend_all', detail: { count } });
		sendNoticesSoon();
		return { done: `${count} failed row${count === 1 ? '' : 's'} queued again.` };
	}
};
