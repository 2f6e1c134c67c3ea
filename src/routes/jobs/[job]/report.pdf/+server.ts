import { error } from '@sveltejs/kit';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { getPhotoStore } from '$lib/server/photos';
import { plantIdentity } from '$lib/server/settings/plant-identity';
import { TOOLROOM_READERS } from '$lib/server/toolroom/access';
import { getJobReport, renderJobReportPdf } from '$lib/server/toolroom/job-report';
import { getJob } from '$lib/server/toolroom/jobs';
import type { RequestHandler } from './$types';

// The one-page job report (PDF), offered on the job page once the job is closed.
export const GET: RequestHandler = async (event) => {
	requireRole(event, ...TOOLROOM_READERS);
	const job = await getJob(getDb(), event.params.job);
	if (!job) error(404, { message: `There is no toolroom job ${event.params.job}.` });
	const report = await getJobReport(getDb(), job, getPhotoStore());
	const pdf = await renderJobReportPdf(report, (await plantIdentity(getDb())).name);
	return new Response(new Uint8Array(pdf), {
		headers: {
			'content-type': 'application/pdf',
			'content-disposition': `inline; filename="job-report-${job.number}.pdf"`,
			'cache-control': 'private, no-store'
		}
	});
};
