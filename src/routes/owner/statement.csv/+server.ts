import { csvResponse } from '$lib/server/csv';
import { getDb } from '$lib/server/db';
import { requireOwner } from '$lib/server/owner/guard';
import {
	statementCsvHeader,
	statementCsvRows,
	statementFileName
} from '$lib/server/owner/statement-csv';
import { statementForRequest } from '$lib/server/owner/statement-request';
import type { RequestHandler } from './$types';

// The owner's statement for a period (or one issued before, by reference) as CSV: the same data
// as the PDF, own dies only.
export const GET: RequestHandler = async (event) => {
	const { user, customerId } = requireOwner(event);
	const statement = await statementForRequest(getDb(), event, customerId, user.id);
	return csvResponse(
		statementFileName(statement, 'csv'),
		statementCsvHeader(statement),
		statementCsvRows(statement)
	);
};
