import { statementPeriodSchema } from '$lib/schemas/statement';
import { getDb } from '$lib/server/db';
import { requireOwner } from '$lib/server/owner/guard';
import { listIssuedStatements } from '$lib/server/owner/period-statement';
import { findOwnerCustomer } from '$lib/server/owner/portfolio';
import { nowIso } from '$lib/server/time';
import { plantToday } from '$lib/plant-time';
import type { PageServerLoad } from './$types';

// The owner's statements: pick a period and download it as PDF or CSV (the form sends the period
// straight to the download, so it works without JavaScript); statements issued before are listed
// by reference. A period that did not parse comes back here with the field messages.
export const load: PageServerLoad = async (event) => {
	const { customerId } = requireOwner(event);
	const db = getDb();
	const params = Object.fromEntries(event.url.searchParams);
	const today = plantToday(nowIso());
	const year = Number(today.slice(0, 4));
	const month = Number(today.slice(5, 7));
	const asked = 'kind' in params;
	const parsed = asked ? statementPeriodSchema.safeParse(params) : null;
	const errors: Record<string, string> = {};
	if (parsed && !parsed.success) {
		for (const issue of parsed.error.issues) {
			const field = String(issue.path[0] ?? 'kind');
			errors[field] ??= issue.message;
		}
	}
	const [customer, issued] = await Promise.all([
		findOwnerCustomer(db, customerId),
		listIssuedStatements(db, customerId)
	]);
	return {
		customer: { name: customer?.name ?? '', code: customer?.code ?? '' },
		values: {
			kind: params.kind ?? 'quarter',
			year: params.year ?? String(year),
			month: params.month ?? String(month),
			quarter: params.quarter ?? String(Math.floor((month - 1) / 3) + 1),
			from: params.from ?? `${today.slice(0, 8)}01`,
			to: params.to ?? today
		},
		errors,
		issued: issued.map((s) => ({
			reference: s.reference,
			period: s.period.label,
			from: s.period.from,
			to: s.period.to,
			issuedAt: s.issuedAt
		}))
	};
};
