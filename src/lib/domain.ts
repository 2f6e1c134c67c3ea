// Domain words shared by client, server and scripts (no imports, safe everywhere).
export type Role = 'admin' | 'toolroom_lead' | 'toolmaker' | 'scheduler' | 'customer';
export type DieStatus = 'ready' | 'running' | 'in_toolroom' | 'held' | 'retired';
export type DieProcess = 'hot_chamber' | 'cold_chamber';
export type AlloyFamily = 'zinc' | 'magnesium' | 'aluminium' | 'copper';
export type HalfSide = 'cover' | 'ejector';
export type ShotSource = 'manual' | 'csv' | 'api' | 'correction' | 'seed' | 'opening';
export type UnitSystem = 'metric' | 'us';
/** Why a die was retired; only the first two are wear failures in the fleet life statistics. */
export type RetirementReason =
	'worn_out' | 'cracked' | 'damaged' | 'obsolete' | 'transferred' | 'recalled';
export const RETIREMENT_REASONS: readonly RetirementReason[] = [
	'worn_out',
	'cracked',
	'damaged',
	'obsolete',
	'transferred',
	'recalled'
];
/**
 * Whether a retired die counts as a wear failure in the fleet life fit: worn out and cracked
 * beyond repair do; an accident, an obsolete part, a transfer or a recall end the die's service
 * for other reasons, so it is right-censored at its shots. A retired die without a recorded
 * reason (from before reasons were asked) counts as worn out, as it always did.
 */
export function isWearFailure(reason: RetirementReason | null): boolean {
	return reason === null || reason === 'worn_out' || reason === 'cracked';
}
/** Repairs that restart a zone's crack series. */
export type RepairKind = 'weld' | 'insert_change' | 'remachining';
export const REPAIR_KINDS: readonly RepairKind[] = ['weld', 'insert_change', 'remachining'];
