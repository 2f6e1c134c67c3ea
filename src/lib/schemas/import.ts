import { z } from 'zod';
import { IMPORT_KINDS } from '../import-fields';

export const draftIdSchema = z.string().regex(/^[0-9a-f]{32}$/, 'That import is not known.');
export const importKindSchema = z.enum(IMPORT_KINDS as ['dies', 'halves', 'service']);

/** A fix typed into the preview for one cell. */
export const importFixSchema = z.object({
	draft: draftIdSchema,
	kind: importKindSchema,
	row: z.coerce.number().int().min(0),
	field: z.string().regex(/^[a-z_0-9]{1,40}$/),
	value: z.string().max(2000, 'Keep it under 2000 characters.')
});

export const importSkipSchema = z.object({
	draft: draftIdSchema,
	kind: importKindSchema,
	row: z.coerce.number().int().min(0),
	skip: z.enum(['1', '0'])
});

export const importResolveSchema = z
	.object({
		draft: draftIdSchema,
		type: z.enum(['owner', 'alloy']),
		text: z.string().trim().min(1).max(200),
		choice: z.string().regex(/^(create|\d+)$/, 'Pick one, or choose to create it.'),
		code: z.string().trim().max(20).default(''),
		name: z.string().trim().max(120).default(''),
		family: z.enum(['zinc', 'magnesium', 'aluminium', 'copper', '']).default('')
	})
	.superRefine((v, ctx) => {
		if (v.choice !== 'create') return;
		if (!/^[A-Z0-9][A-Z0-9-]{0,19}$/i.test(v.code)) {
			ctx.addIssue({
				code: 'custom',
				path: ['code'],
				message: 'Give a code of letters, digits or dashes (up to 20).'
			});
		}
		if (!v.name) ctx.addIssue({ code: 'custom', path: ['name'], message: 'Give a name.' });
		if (v.type === 'alloy' && !v.family) {
			ctx.addIssue({ code: 'custom', path: ['family'], message: 'Choose the alloy family.' });
		}
	});

export const importModeSchema = z.object({
	draft: draftIdSchema,
	mode: z.enum(['create', 'update'], { error: 'Choose create or update.' })
});
