import { fail } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { WEAK_FLOW_THRESHOLD_PCT } from '$lib/calc/cooling';
import { circuitSchema, coolingCheckSchema, heatBalanceQuerySchema } from '$lib/schemas/toolroom';
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
	getHeatBalance,
	lastOilProperties,
	listCircuits,
	recordCheck
} from '$lib/server/toolroom/cooling';
import { getJob } from '$lib/server/toolroom/jobs';
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
	const [heatBalance, circuitForm, checkForm] = await Promise.all([
		getHeatBalance(db, die, circuits, heatInput.query),
		superValidate(zod4(circuitSchema), { id: 'circuit' }),
		superValidate(
			checkCircuit ? { circuitId: checkCircuit.id, ...lastOilProperties(checkCircuit) } : {},
			zod4(coolingCheckSchema),
			{ id: 'check', errors: false }
		)
	]);
	return {
		circuits,
		recentChecks,
		heatBalance,
		heatInput: { raw: heatInput.raw, errors: { ...heatInput.errors } },
		circuitForm,
		checkForm,
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
		const data = await event.request.formData();
		const form = await superValidate(data, zod4(coolingCheckSchema), { id: 'check' });
		if (!form.valid) return fail(400, { checkForm: form });
		const jobNumber = String(data.get('job') ?? '').trim();
		const job = jobNumber ? await getJob(getDb(), jobNumber) : undefined;
		if (jobNumber && !job) {
			return message(form, `There is no toolroom job ${jobNumber}; the check was not saved.`, {
				status: 400
			});
		}
		const result = await recordCheck(getDb(), {
			dieId: die.id,
			jobId: job?.id ?? null,
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
		form.message = result.figures.weak
			? `Check recorded: flow is ${pct} % of nominal — below ${WEAK_FLOW_THRESHOLD_PCT} %, flagged as weak.`
			: `Check recorded: flow is ${pct} % of nominal.`;
		return { checkForm: form, taskOffer: result.offer };
	}
};
