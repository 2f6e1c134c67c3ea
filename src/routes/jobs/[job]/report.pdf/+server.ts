import { error } from '@sveltejs/kit';
import { env } from '$env/dynamic/private';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { readPlantName } from '$lib/server/owner/plant-name';
import { getUploadDir } from '$lib/server/photos/upload-dir';
import { TOOLROOM_READERS } from '$lib/server/toolroom/access';
import { getJobReport, renderJobReportPdf } from '$lib/server/toolroom/job-report';
import { getJob } from '$lib/server/toolroom/jobs';
import type { RequestHandler } from './$types';

// The one-page job report (PDF), offered on the job page once the job is closed.
export const GET: RequestHandler = async (event) => {
	requireRole(event, ...TOOLROOM_READERS);
	const job = await getJob(getDb(), event.params.job);
	if (!job) error(404, { message: `There is no toolroom job ${event.params.job}.` });
	const report = await getJobReport(getDb(), job, getUploadDir());
	const pdf = await renderJobReportPdf(report, readPlantName(env));
	return new Response(new Uint8Array(pdf), {
		headers: {
			'content-type': 'application/pdf',
			'content-disposition': `inline; filename="job-report-${job.number}.pdf"`,
			'cache-control': 'private, no-store'
		}
	});
};
