/** Heads the tooling statement and the invitation e-mail when PLANT_NAME is not set. */
export const DEFAULT_PLANT_NAME = 'Castellan plant';

/** The plant's name from PLANT_NAME (pass SvelteKit's dynamic private env, or process.env). */
export function readPlantName(env: Record<string, string | undefined>): string {
	return env.PLANT_NAME?.trim() || DEFAULT_PLANT_NAME;
}
