// The plant's own settings (one row, id 1); added to the Database interface in schema.ts.

export interface PlantSettingsTable {
	id: number;
	/** IANA time zone name; the plant's days, dates and clock times are this zone's. */
	time_zone: string;
	updated_at: string | null;
	updated_by: string | null;
}

/** The plant's replacement lead time per alloy family, days (used when a die has none of its own). */
export interface ReplacementLeadDefaultsTable {
	family: 'zinc' | 'magnesium' | 'aluminium' | 'copper';
	lead_days: number;
	updated_at: string | null;
	updated_by: string | null;
}

export interface PlantSettingsTables {
	plant_settings: PlantSettingsTable;
	replacement_lead_defaults: ReplacementLeadDefaultsTable;
}
