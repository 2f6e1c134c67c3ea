import { error } from '@sveltejs/kit';
import { env } from '$env/dynamic/private';
import { getDb } from '$lib/server/db';
import { requireOwner } from '$lib/server/owner/guard';
import { readPlantName } from '$lib/server/owner/plant-name';
import { getOwnerStatement } from '$lib/server/owner/statement';
import { renderStatementPdf } from '$lib/server/owner/statement-pdf';
import { plantDate } from '$lib/plant-time';
import type { RequestHandler } from './$types';

// The owner's tooling statement as a PDF to file: only its own dies, as of now.
export const GET: RequestHandler = async (event) => {
	const { customerId } = requireOwner(event);
	const statement = await getOwnerStatement(getDb(), customerId);
	if (!statement) error(404, { message: 'There is no statement for your account.' });
	const plantName = readPlantName(env);
	const pdf = await renderStatementPdf(statement, plantName);
	const name = `tooling-statement-${statement.customer.code}-${plantDate(statement.asOf)}.pdf`;
	return new Response(new Uint8Array(pdf), {
		headers: {
			'content-type': 'application/pdf',
			'content-disposition': `attachment; filename="${name.replace(/[^\w.-]/g, '_')}"`,
			'cache-control': 'private, no-store'
		}
	});
};
