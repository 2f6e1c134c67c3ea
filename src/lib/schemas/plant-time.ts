import { z } from 'zod';
import { isTimeZone } from '../calc/zone';

/** The admin's plant time zone form: one IANA name from the list. */
export const plantZoneSchema = z.object({
	timeZone: z
		.string({ error: 'Pick the plant’s time zone.' })
		.trim()
		.min(1, 'Pick the plant’s time zone.')
		.refine(isTimeZone, 'That is not a time zone; pick one from the list.')
});
export type PlantZoneForm = z.infer<typeof plantZoneSchema>;
