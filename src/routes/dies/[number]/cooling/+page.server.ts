import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { WEAK_FLOW_THRESHOLD_PCT } from '$lib/calc/cooling';
import {
	circuitSchema,
	coolingCheckSchema,
	correctCheckSchema,
	heatBalanceQuerySchema,
	voidRecordSchema
} from '$lib/schemas/toolroom';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { loadPlantDie } from '$lib/server/dies/load-die';
import {
	canLeadToolroom,
	canWorkToolroom,
	TOOLROOM_LEADS,
	TOOLROOM_READERS,
	TOOLROOM_WORKERS
} from '$lib/server/toolroom/access';
import {
	addCircuit,
	correctCoolingCheck,
	getHeatBalance,
	lastOilProperties,
	listCircuits,
	recordCheck,
	voidCoolingCheck
} from '$lib/server/toolroom/cooling';
import type { Actions, PageServerLoad } from './$types';

/** The heat-balance inputs from the URL: none given, valid, or field errors to show. */
function readHeatBalanceQuery(params: URLSearchParams) {
	const raw = Object.fromEntries(
		['shotMassKg', 'shotsPerHour', 'ejectC', 'latentHeatKjKg'].map((k) => [k, params.get(k) ?? ''])
	);
	if (!raw.shotMassKg && !raw.shotsPerHour && !raw.ejectC) return { raw, query: null, errors: {} };
	const parsed = heatBalanceQuerySchema.safeParse(raw);
	if (parsed.success) return { raw, query: parsed.data, errors: {} };
	const errors: Record<string, string> = {};
	for (const issue of parsed.error.issues) errors[String(issue.path[0])] ??= issue.message;
	return { raw, query: null, errors };
}

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...TOOLROOM_READERS);
	const die = await loadPlantDie(event.params.number);
	const db = getDb();
	const { circuits, recentChecks } = await listCircuits(db, die.id);
	const wanted = Number(event.url.searchParams.get('check'));
	const checkCircuit = circuits.find((c) => c.id === wanted) ?? circuits[0];
	const heatInput = readHeatBalanceQuery(event.url.searchParams);
	const [heatBalance, circuitForm, checkForm, voidForm, correctForm] = await Promise.all([
		getHeatBalance(db, die, circuits, heatInput.query),
		superValidate(zod4(circuitSchema), { id: 'circuit' }),
		superValidate(
			checkCircuit ? { circuitId: checkCircuit.id, ...lastOilProperties(checkCircuit) } : {},
			zod4(coolingCheckSchema),
			{ id: 'check', errors: false }
		),
		superValidate(zod4(voidRecordSchema), { id: 'voidCheck' }),
		superValidate(zod4(correctCheckSchema), { id: 'correctCheck' })
	]);
	return {
		circuits,
		recentChecks,
		heatBalance,
		heatInput: { raw: heatInput.raw, errors: { ...heatInput.errors } },
		circuitForm,
		checkForm,
		voidForm,
		correctForm,
		weakThreshold: WEAK_FLOW_THRESHOLD_PCT,
		unitSystem: user.unitSystem,
		canWork: canWorkToolroom(user.role),
		canLead: canLeadToolroom(user.role)
	};
};

export const actions: Actions = {
	circuit: async (event) => {
		const user = requireRole(event, ...TOOLROOM_LEADS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(circuitSchema), { id: 'circuit' });
		if (!form.valid) return fail(400, { circuitForm: form });
		const result = await addCircuit(getDb(), {
			dieId: die.id,
			form: form.data,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) {
			if (result.field) {
				return setError(form, result.field as 'label', result.message, { status: result.status });
			}
			return message(form, result.message, { status: result.status });
		}
		return message(form, `Circuit ${form.data.label} added.`);
	},

	check: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(coolingCheckSchema), { id: 'check' });
		if (!form.valid) return fail(400, { checkForm: form });
		const result = await recordCheck(getDb(), {
			dieId: die.id,
			form: form.data,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) {
			if (result.field) {
				return setError(form, result.field as 'circuitId', result.message, {
					status: result.status
				});
			}
			return message(form, result.message, { status: result.status });
		}
		const pct = Math.round(result.figures.pctOfNominal);
		// Says how the typed flow was read (a decimal comma, grouping), so nothing is reread silently.
		const flow = `flow read as ${form.data.measuredFlowLpm} L/min is ${pct} % of nominal`;
		return message(
			form,
			result.figures.weak
				? `Check recorded: ${flow} — below ${WEAK_FLOW_THRESHOLD_PCT} %, flagged as weak.`
				: `Check recorded: ${flow}.`
		);
	},

	voidCheck: async (event) => {
		const user = requireRole(event, ...TOOLROOM_LEADS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(voidRecordSchema), { id: 'voidCheck' });
		if (!form.valid) return fail(400, { voidForm: form });
		const result = await voidCoolingCheck(getDb(), {
			dieId: die.id,
			checkId: form.data.id,
			reason: form.data.reason,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) {
			const field = result.field === 'reason' ? 'reason' : 'id';
			return setError(form, field, result.message, { status: result.status });
		}
		return message(
			form,
			'Check voided: it stays in the list, struck through, and no longer counts.'
		);
	},

	correctCheck: async (event) => {
		const user = requireRole(event, ...TOOLROOM_LEADS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(correctCheckSchema), {
			id: 'correctCheck'
		});
		if (!form.valid) return fail(400, { correctForm: form });
		const { checkId, reason, ...reading } = form.data;
		const result = await correctCoolingCheck(getDb(), {
			dieId: die.id,
			checkId,
			form: reading,
			reason,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) {
			return setError(form, (result.field ?? 'checkId') as 'checkId', result.message, {
				status: result.status
			});
		}
		const pct = Math.round(result.figures.pctOfNominal);
		return message(
			form,
			`Check corrected: flow read as ${reading.measuredFlowLpm} L/min is ${pct} % of nominal; the old reading is struck through.`
		);
	}
};
