// The plant's own settings (one row, id 1); added to the Database interface in schema.ts.

export interface PlantSettingsTable {
	id: number;
	/** IANA time zone name; the plant's days, dates and clock times are this zone's. */
	time_zone: string;
	updated_at: string | null;
	updated_by: string | null;
}

export interface PlantSettingsTables {
	plant_settings: PlantSettingsTable;
}
