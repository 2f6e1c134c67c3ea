// Toolroom forms (jobs, surface inspections, cooling), shared by client and server.
import { z } from 'zod';
import {
	decimalNumber,
	nullableDecimalNumber,
	optionalDecimalNumber,
	wholeNumber
} from './numbers';

export const JOB_KINDS = [
	'repair',
	'stress_relief',
	'surface_inspection',
	'cooling_flush',
	'teardown',
	'modification'
] as const;
export const JOB_ACTIVE_STATUSES = ['open', 'in_progress', 'waiting_parts'] as const;
export const JOB_STATUSES = [...JOB_ACTIVE_STATUSES, 'done', 'cancelled'] as const;
export type JobActiveStatus = (typeof JOB_ACTIVE_STATUSES)[number];

/** Photos one upload may carry; more must be sent in a second upload. */
export const MAX_PHOTOS_PER_UPLOAD = 10;

const blankToUndefined = (v: unknown) =>
	v === '' || v === null || v === undefined ? undefined : v;

// Null as well as empty: an untouched field comes back from the client as null.
const optionalText = (max: number) =>
	z
		.string()
		.trim()
		.max(max, `Keep it under ${max} characters.`)
		.nullish()
		.transform((v) => (v ? v : null));

const halfSchema = z.enum(['cover', 'ejector'], { error: 'Choose the half.' });

export const openJobSchema = z.object({
	kind: z.enum(JOB_KINDS, { error: 'Choose what kind of job this is.' }),
	half: z.enum(['cover', 'ejector', 'both'], { error: 'Choose the half.' }),
	zone: optionalText(120),
	description: z
		.string()
		.trim()
		.min(3, 'Say in a few words what is wrong or what to do.')
		.max(2000, 'Keep it under 2000 characters.'),
	assignedTo: z.string().trim().max(40).default(''),
	serviceTaskIds: z.array(z.number().int().positive()).default([]),
	dieToToolroom: z.boolean().default(true),
	noticeId: z.preprocess(blankToUndefined, z.coerce.number().int().positive().optional())
});
export type OpenJobForm = z.infer<typeof openJobSchema>;

export const jobStatusSchema = z.object({
	to: z.enum(JOB_ACTIVE_STATUSES, { error: 'Choose the new status.' })
});

export const assignJobSchema = z.object({
	assignedTo: z.string().trim().max(40).default('')
});

export const closeJobSchema = z
	.object({
		findings: z
			.string()
			.trim()
			.min(3, 'Record what you found.')
			.max(4000, 'Keep it under 4000 characters.'),
		workDone: z
			.string()
			.trim()
			.min(3, 'Record the work done.')
			.max(4000, 'Keep it under 4000 characters.'),
		// Hours not yet recorded on the job; added to those recorded while it was open. Required
		// (by closeJob) only when none were recorded.
		hours: nullableDecimalNumber({
			min: [0, 'Hours cannot be negative.'],
			max: [500, 'More than 500 hours on one job is not plausible; split it.']
		}),
		partsUsed: optionalText(2000),
		billableToOwner: z.boolean().default(false),
		ownerSummary: optionalText(2000),
		summaryShared: z.boolean().default(false)
	})
	.refine((f) => !f.summaryShared || !!f.ownerSummary, {
		path: ['ownerSummary'],
		message: 'Write the summary the owner will see, or untick “share with the owner”.'
	});
export type CloseJobForm = z.infer<typeof closeJobSchema>;

/** Hours worked on an open job, recorded as they are worked (any number of entries). */
export const workEntrySchema = z.object({
	hours: decimalNumber({
		required: 'Enter the hours worked, e.g. 1.5.',
		gt: [0, 'Enter more than 0 hours.'],
		max: [24, 'One entry covers at most 24 hours; add another for more.']
	}),
	note: optionalText(500)
});
export type WorkEntryForm = z.infer<typeof workEntrySchema>;

/** A zone of the die repaired by an open job (its crack series restarts after the job). */
export const jobRepairSchema = z.object({
	zoneId: wholeNumber({ required: 'Choose the zone.', min: [1, 'Choose the zone.'] }),
	kind: z.enum(['weld', 'insert_change', 'remachining'], { error: 'Choose what was done.' })
});

/** A part used on an open job. */
export const partUsedSchema = z.object({
	part: z
		.string()
		.trim()
		.min(2, 'Name the part, e.g. “ejector pin 8 × 250”.')
		.max(120, 'Keep it under 120 characters.'),
	quantity: decimalNumber({
		required: 'Enter how many, e.g. 4.',
		gt: [0, 'Enter a quantity above 0.'],
		max: [10_000, 'More than 10 000 of one part is not plausible.']
	})
});
export type PartUsedForm = z.infer<typeof partUsedSchema>;

export const cancelJobSchema = z.object({
	reason: z
		.string()
		.trim()
		.min(3, 'Give a reason of at least 3 characters.')
		.max(500, 'Keep it under 500 characters.')
});

export const inspectionSchema = z.object({
	half: halfSchema,
	zone: z
		.string()
		.trim()
		.min(1, 'Name the zone, e.g. “gate side, cavity 2”.')
		.max(120, 'Keep it under 120 characters.'),
	shotsAt: wholeNumber({
		required: 'Enter the die’s shots at the inspection.',
		min: [0, 'Shots cannot be negative.'],
		max: [100_000_000, 'That many shots is not plausible.']
	}),
	// No grade is preselected: the toolmaker chooses one.
	grade: wholeNumber({
		required: 'Choose a surface grade.',
		min: [0, 'Choose a surface grade from 0 to 4.'],
		max: [4, 'Choose a surface grade from 0 to 4.']
	}),
	longestCrackMm: nullableDecimalNumber({
		min: [0, 'A crack length cannot be negative.'],
		max: [2000, 'Longer than 2 m is not plausible.']
	}),
	soldering: z.boolean().default(false),
	erosion: z.boolean().default(false),
	notes: optionalText(2000)
});
export type InspectionForm = z.infer<typeof inspectionSchema>;

export const circuitSchema = z.object({
	half: halfSchema,
	label: z
		.string()
		.trim()
		.min(1, 'Label the circuit as it is marked on the die, e.g. “C1 core”.')
		.max(40, 'Keep it under 40 characters.'),
	coolant: z.enum(['water', 'oil'], { error: 'Choose water or oil.' }),
	channelDiameterMm: decimalNumber({
		required: 'Enter the channel diameter in mm.',
		gt: [0, 'The diameter must be more than 0 mm.'],
		max: [80, 'More than 80 mm is not plausible for a die cooling channel.']
	}),
	nominalFlowLpm: decimalNumber({
		required: 'Enter the nominal flow in L/min.',
		gt: [0, 'The nominal flow must be more than 0 L/min.'],
		max: [500, 'More than 500 L/min is not plausible for one circuit.']
	})
});
export type CircuitForm = z.infer<typeof circuitSchema>;

export const coolingCheckSchema = z.object({
	/** The line was flushed with this check. */
	flushed: z.boolean().default(false),
	circuitId: wholeNumber({ required: 'Choose the circuit.', min: [1, 'Choose the circuit.'] }),
	measuredFlowLpm: decimalNumber({
		required: 'Enter the measured flow in L/min.',
		min: [0, 'Flow cannot be negative.'],
		max: [1000, 'More than 1000 L/min is not plausible.']
	}),
	inletC: decimalNumber({
		required: 'Enter the inlet temperature in °C.',
		min: [1, 'Inlet temperature must be at least 1 °C.'],
		max: [350, 'More than 350 °C is not plausible.']
	}),
	outletC: decimalNumber({
		required: 'Enter the outlet temperature in °C.',
		min: [1, 'Outlet temperature must be at least 1 °C.'],
		max: [350, 'More than 350 °C is not plausible.']
	}),
	supplyPressureBar: nullableDecimalNumber({
		min: [0, 'Pressure cannot be negative.'],
		max: [60, 'More than 60 bar is not plausible for a cooling supply.']
	}),
	leakTest: z
		.enum(['pass', 'fail'], { error: 'Record the leak test: pass or fail.' })
		.nullable()
		.refine((v) => v !== null, 'Record the leak test: pass or fail.')
		.transform((v) => v as 'pass' | 'fail'),
	notes: optionalText(2000),
	oilDensityKgM3: nullableDecimalNumber({
		min: [600, 'Oil density is usually 800–1000 kg/m³.'],
		max: [1300, 'Oil density is usually 800–1000 kg/m³.']
	}),
	oilViscosityMpaS: nullableDecimalNumber({
		gt: [0, 'Viscosity must be more than 0 mPa·s.'],
		max: [5000, 'More than 5000 mPa·s is not plausible at working temperature.']
	}),
	oilSpecificHeatJKgK: nullableDecimalNumber({
		min: [1000, 'Thermal oils are about 1800–2800 J/(kg·K).'],
		max: [4000, 'Thermal oils are about 1800–2800 J/(kg·K).']
	}),
	/**
	 * Why an unusual reading (outlet not warmer than inlet, flow above 3× nominal) is right; the
	 * server asks for it only when the reading is unusual.
	 */
	unusualReason: z.string().trim().max(300, 'Keep the reason under 300 characters.').default('')
});
export type CoolingCheckForm = z.infer<typeof coolingCheckSchema>;

/** Heat-balance inputs, read from the URL so the result can be bookmarked and works without JS. */
export const heatBalanceQuerySchema = z.object({
	shotMassKg: decimalNumber({
		required: 'Enter the metal per shot in kg.',
		gt: [0, 'The shot mass must be more than 0 kg.'],
		max: [200, 'More than 200 kg per shot is not plausible.']
	}),
	shotsPerHour: decimalNumber({
		required: 'Enter shots per hour.',
		gt: [0, 'Shots per hour must be more than 0.'],
		max: [20_000, 'More than 20 000 shots per hour is not plausible.']
	}),
	ejectC: decimalNumber({
		required: 'Enter the casting temperature at ejection in °C.',
		min: [20, 'Ejection temperature must be at least 20 °C.'],
		max: [1500, 'Ejection temperature must be below 1500 °C.']
	}),
	latentHeatKjKg: optionalDecimalNumber({
		min: [10, 'Latent heat of die-casting alloys is about 100–400 kJ/kg.'],
		max: [1000, 'Latent heat of die-casting alloys is about 100–400 kJ/kg.']
	})
});
export type HeatBalanceQuery = z.infer<typeof heatBalanceQuerySchema>;

export const jobBoardQuerySchema = z.object({
	status: z.enum(['', ...JOB_STATUSES]).catch(''),
	toolmaker: z.string().trim().max(40).catch(''),
	die: z.string().trim().toUpperCase().max(20).catch(''),
	page: z.coerce.number().int().min(1).max(100_000).catch(1)
});
export type JobBoardQuery = z.infer<typeof jobBoardQuerySchema>;

/** Stage tag of a job photo; an empty choice means "not said". */
export const PHOTO_STAGES = ['before', 'during', 'after'] as const;
export const photoStageSchema = z.preprocess(
	(v) => (v === '' || v === null || v === undefined ? null : v),
	z.enum(PHOTO_STAGES, { error: 'Choose before, during or after.' }).nullable()
);

export const photoShareSchema = z.object({
	photo: z
		.string()
		.trim()
		.regex(/^[A-Za-z0-9_-]{16,40}$/, 'Unknown photo.'),
	shared: z.enum(['0', '1']).transform((v) => v === '1')
});

const voidReason = z
	.string({ error: 'Give the reason.' })
	.trim()
	.min(5, 'Give the reason (at least 5 characters).')
	.max(300, 'Keep the reason under 300 characters.');

/** Voiding an inspection, a cooling check or a job: which one, and why (toolroom lead). */
export const voidRecordSchema = z.object({
	id: wholeNumber({ required: 'Choose the record.', min: [1, 'Choose the record.'] }),
	reason: voidReason
});
export type VoidRecordForm = z.infer<typeof voidRecordSchema>;

/** Voiding a work entry or a part used on a job (toolroom lead). */
export const voidJobEntrySchema = voidRecordSchema.extend({
	entry: z.enum(['work', 'part'], { error: 'Choose the entry.' })
});

/** Correcting a cooling check: the right reading and why the first one was wrong. */
export const correctCheckSchema = coolingCheckSchema.omit({ circuitId: true }).extend({
	checkId: wholeNumber({ required: 'Choose the check.', min: [1, 'Choose the check.'] }),
	reason: voidReason
});
export type CorrectCheckForm = z.infer<typeof correctCheckSchema>;

/** Correcting an inspection's figures; half, zone, notes and photos stay as recorded. */
export const correctInspectionSchema = z.object({
	id: wholeNumber({ required: 'Choose the inspection.', min: [1, 'Choose the inspection.'] }),
	shotsAt: inspectionSchema.shape.shotsAt,
	grade: inspectionSchema.shape.grade,
	longestCrackMm: inspectionSchema.shape.longestCrackMm,
	reason: voidReason
});
export type CorrectInspectionForm = z.infer<typeof correctInspectionSchema>;

/** Voiding a toolroom job: the reason (the job is the page's). */
export const voidJobSchema = z.object({ reason: voidReason });
/** A zone the toolroom lead adds to a die's list (one half). */
export const zoneSchema = z.object({
	half: z.enum(['cover', 'ejector'], { error: 'Choose the half.' }),
	name: z
		.string()
		.trim()
		.min(2, 'Name the zone, e.g. gate side or cavity 2.')
		.max(60, 'Keep the zone name under 60 characters.')
});
