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
	editCircuit,
	getHeatBalance,
	setCoolingLock,
	lastOilProperties,
	listCircuits,
	recordCheck,
	voidCoolingCheck
} from '$lib/server/toolroom/cooling';
import { getJob } from '$lib/server/toolroom/jobs';
import { voidRecordAction } from '$lib/server/toolroom/void-action';
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
	const locked = die.cooling_locked === 1;
	const canEditCircuits = canWorkToolroom(user.role) && (!locked || canLeadToolroom(user.role));
	// ?edit=<id> puts that circuit into the circuit form for a change.
	const editing = canEditCircuits
		? (circuits.find((c) => c.id === Number(event.url.searchParams.get('edit'))) ?? null)
		: null;
	const [heatBalance, circuitForm, checkForm, voidForm, correctForm] = await Promise.all([
		getHeatBalance(db, die, circuits, heatInput.query),
		editing
			? superValidate(
					{
						half: editing.half,
						label: editing.label,
						coolant: editing.coolant,
						channelDiameterMm: editing.channel_diameter_mm,
						nominalFlowLpm: editing.nominal_flow_lpm
					},
					zod4(circuitSchema),
					{ id: 'circuit', errors: false }
				)
			: superValidate(zod4(circuitSchema), { id: 'circuit' }),
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
		canLead: canLeadToolroom(user.role),
		locked,
		canEditCircuits,
		editing: editing ? { id: editing.id, label: editing.label } : null
	};
};

export const actions: Actions = {
	circuit: async (event) => {
		const user = requireRole(event, ...TOOLROOM_WORKERS);
		const die = await loadPlantDie(event.params.number);
		const body = await event.request.formData();
		const form = await superValidate(body, zod4(circuitSchema), { id: 'circuit' });
		if (!form.valid) return fail(400, { circuitForm: form });
		// A circuit id in the form means "change this circuit"; none means "add one".
		const circuitId = Number(body.get('circuitId'));
		const input = { dieId: die.id, form: form.data, actor: { userId: user.id, role: user.role } };
		const result =
			Number.isInteger(circuitId) && circuitId > 0
				? await editCircuit(getDb(), { ...input, circuitId })
				: await addCircuit(getDb(), input);
		if (!result.ok) {
			if (result.field) {
				return setError(form, result.field as 'label', result.message, { status: result.status });
			}
			return message(form, result.message, { status: result.status });
		}
		return message(
			form,
			body.get('circuitId')
				? `Circuit ${form.data.label} changed.`
				: `Circuit ${form.data.label} added.`
		);
	},

	lock: async (event) => {
		const user = requireRole(event, ...TOOLROOM_LEADS);
		const die = await loadPlantDie(event.params.number);
		const locked = (await event.request.formData()).get('locked') === '1';
		const result = await setCoolingLock(getDb(), {
			dieId: die.id,
			locked,
			actor: { userId: user.id, role: user.role }
		});
		if (!result.ok) return fail(result.status, { lockMessage: result.message });
		return { lockMessage: locked ? 'Circuit list locked.' : 'Circuit list unlocked.' };
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
		// Says how the typed flow was read (a decimal comma, grouping), so nothing is reread silently.
		const flow = `flow read as ${form.data.measuredFlowLpm} L/min is ${pct} % of nominal`;
		form.message = result.figures.weak
			? `Check recorded: ${flow} — below ${WEAK_FLOW_THRESHOLD_PCT} %, flagged as weak.`
			: `Check recorded: ${flow}.`;
		return { checkForm: form, taskOffer: result.offer };
	},

	voidCheck: voidRecordAction(
		'voidCheck',
		(db, { id, ...rest }) => voidCoolingCheck(db, { checkId: id, ...rest }),
		'Check voided: it stays in the list, struck through, and no longer counts.'
	),

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
