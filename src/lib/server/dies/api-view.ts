import type { DieListRow } from './register';

/** The die as `/api/v1/dies` answers it (DESIGN.md "Interfaces"). */
export function dieApiView(row: DieListRow) {
	return {
		number: row.number,
		part: row.partName,
		customer: { code: row.customerCode, name: row.customerName },
		alloy: row.alloyCode,
		family: row.family,
		status: row.status,
		totalShots: row.totalShots,
		expectedLifeShots: row.expectedLifeShots,
		lifeUsedPct: Math.round(row.lifeUsedPct * 100) / 100,
		nextService: row.nextService
			? {
					kind: row.nextService.kind,
					state: row.nextService.state,
					shotsRemaining: row.nextService.shotsRemaining,
					daysRemaining: row.nextService.daysRemaining
				}
			: null
	};
}
