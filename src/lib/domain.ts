// Domain words shared by client, server and scripts (no imports, safe everywhere).
export type Role = 'admin' | 'toolroom_lead' | 'toolmaker' | 'scheduler' | 'customer';
export type DieStatus = 'ready' | 'running' | 'in_toolroom' | 'held' | 'retired';
export type DieProcess = 'hot_chamber' | 'cold_chamber';
export type AlloyFamily = 'zinc' | 'magnesium' | 'aluminium' | 'copper';
export type HalfSide = 'cover' | 'ejector';
export type ShotSource = 'manual' | 'csv' | 'api' | 'correction' | 'seed';
export type UnitSystem = 'metric' | 'us';
/** Why a die was retired; only the first two are wear failures in the fleet life statistics. */
export type RetirementReason =
	| 'worn_out'
	| 'cracked'
	| 'damaged'
	| 'obsolete'
	| 'transferred'
	| 'recalled';
export const RETIREMENT_REASONS: readonly RetirementReason[] = [
	'worn_out',
	'cracked',
	'damaged',
	'obsolete',
	'transferred',
	'recalled'
];
/** Repairs that restart a zone's crack series. */
export type RepairKind = 'weld' | 'insert_change' | 'remachining';
export const REPAIR_KINDS: readonly RepairKind[] = ['weld', 'insert_change', 'remachining'];
