import { getDb } from '$lib/server/db';
import { requireOwner } from '$lib/server/owner/guard';
import { statementFileName } from '$lib/server/owner/statement-csv';
import { renderPeriodStatementPdf } from '$lib/server/owner/statement-pdf';
import { readPlantLogo, statementForRequest } from '$lib/server/owner/statement-request';
import type { RequestHandler } from './$types';

// The owner's statement for a period (or one issued before, by reference) as a PDF: own dies only.
export const GET: RequestHandler = async (event) => {
	const { user, customerId } = requireOwner(event);
	const statement = await statementForRequest(getDb(), event, customerId, user.id);
	const pdf = await renderPeriodStatementPdf(statement, await readPlantLogo(statement.plant));
	return new Response(new Uint8Array(pdf), {
		headers: {
			'content-type': 'application/pdf',
			'content-disposition': `attachment; filename="${statementFileName(statement, 'pdf')}"`,
			'cache-control': 'private, no-store'
		}
	});
};
