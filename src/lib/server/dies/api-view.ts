import { effectiveMetalPressureBar } from '../../calc/clamp';
import type { AlloyFamily, DieProcess } from '../db/schema';
import type { DieListRow } from './register';

/**
 * The die's metal (intensification) pressure as the API shows it: its own figure, or the family
 * default the clamping check falls back on, saying which.
 */
export function dieMetalPressureView(die: {
	metal_pressure_bar: number | null;
	process: DieProcess;
	family: AlloyFamily;
}) {
	return {
		metalPressureBar: effectiveMetalPressureBar(die.metal_pressure_bar, die.process, die.family),
		metalPressureIsDefault: die.metal_pressure_bar === null
	};
}

/** The die as `/api/v1/dies` answers it (DESIGN.md "Interfaces"). */
export function dieApiView(row: DieListRow) {
	return {
		number: row.number,
		part: row.partName,
		partNumber: row.partNumber,
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
