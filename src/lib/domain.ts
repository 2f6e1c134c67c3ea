// Domain words shared by client, server and scripts (no imports, safe everywhere).
export type Role = 'admin' | 'toolroom_lead' | 'toolmaker' | 'scheduler' | 'customer';
export type DieStatus = 'ready' | 'running' | 'in_toolroom' | 'held' | 'retired';
export type DieProcess = 'hot_chamber' | 'cold_chamber';
export type AlloyFamily = 'zinc' | 'magnesium' | 'aluminium' | 'copper';
export type HalfSide = 'cover' | 'ejector';
export type ShotSource = 'manual' | 'csv' | 'api' | 'correction' | 'seed' | 'opening';
export type UnitSystem = 'metric' | 'us';
