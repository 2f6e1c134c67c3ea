import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { buildArchive } from '$lib/server/archive/export';
import { writeAudit } from '$lib/server/audit';
import { getPhotoStore } from '$lib/server/photos';
import type { RequestHandler } from './$types';

// The whole plant as one ZIP (admin only); the download itself is on the audit trail.
export const GET: RequestHandler = async (event) => {
	const user = requireRole(event, 'admin');
	const db = getDb();
	const { zip, summary } = await buildArchive(db, getPhotoStore());
	await writeAudit(db, { userId: user.id, action: 'data.export', detail: { bytes: summary.bytes, photos: summary.photos } });
	const day = new Date().toISOString().slice(0, 10);
	return new Response(Buffer.from(zip), {
		headers: {
			'content-type': 'application/zip',
			'content-disposition': `attachment; filename="castellan-plant-${day}.zip"`,
			'cache-control': 'no-store'
		}
	});
};
