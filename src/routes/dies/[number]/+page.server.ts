import { fail } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { askOwnerSchema, dieStatusSchema } from '$lib/schemas/die';
import { requireRole } from '$lib/server/auth/guard';
import { getDb } from '$lib/server/db';
import { getDieStory } from '$lib/server/dies/die-detail';
import { loadPlantDie } from '$lib/server/dies/load-die';
import { describeStateChanges, moveDieState } from '$lib/server/dies/state-change';
import { loadDecisionCard } from '$lib/server/owner/decisions';
import { holdForOwnerDecision } from '$lib/server/owner/hold';
import { listServicePlan } from '$lib/server/dies/service-plan';
import { nowIso } from '$lib/server/time';
import { DIE_EDITORS, PLANT_ROLES } from '$lib/roles';
import type { DieStatus } from '$lib/domain';
import type { Actions, PageServerLoad } from './$types';

/** Tasks the overview shows; the plan tab has them all. */
const OVERVIEW_TASKS = 4;
const OVERVIEW_ENTRIES = 8;

/** Which states this role may move the die to from where it is. */
function allowedTargets(role: string, from: DieStatus): DieStatus[] {
	if (from === 'retired') return [];
	const all: DieStatus[] = ['ready', 'running', 'in_toolroom', 'held', 'retired'];
	if (DIE_EDITORS.includes(role as never)) return all.filter((s) => s !== from);
	// A toolmaker moves dies into and out of the toolroom, nothing else.
	if (role === 'toolmaker') return from === 'in_toolroom' ? ['ready'] : ['in_toolroom'];
	return [];
}

export const load: PageServerLoad = async (event) => {
	const user = requireRole(event, ...PLANT_ROLES);
	const { die, life } = await event.parent();
	const db = getDb();
	const asOf = nowIso();
	const statusTargets = allowedTargets(user.role, die.status);
	const [story, plan, statusForm, stateChoices, decisions] = await Promise.all([
		getDieStory(db, die, asOf),
		listServicePlan(db, die, life.shotsPerDay, asOf),
		// Start on "Choose…", not on the schema's first state.
		superValidate(
			{ status: '' as DieStatus, reason: '', retirementReason: '' as const, seenBlocked: -1 },
			zod4(dieStatusSchema),
			{ errors: false }
		),
		describeStateChanges(db, die, statusTargets, asOf),
		loadDecisionCard(db, die.id)
	]);
	const askForm = await superValidate(zod4(askOwnerSchema), { errors: false });
	const needsService = plan.tasks.filter((t) => t.state !== 'on_track').length;
	// The soonest projected date, which need not be the worst task now (a short calendar interval
	// can fall due before a task further through a long one).
	const nextDue =
		[...plan.tasks]
			.filter((t) => t.projectedDue !== null)
			.sort((a, b) => a.projectedDue!.localeCompare(b.projectedDue!))[0] ?? null;
	return {
		tasks: plan.tasks.slice(0, OVERVIEW_TASKS),
		nextDue,
		taskCount: plan.tasks.length,
		needsService,
		halves: story.halves,
		entries: story.entries.slice(0, OVERVIEW_ENTRIES),
		history: story.history,
		statusForm,
		statusTargets,
		stateChoices,
		canEdit: DIE_EDITORS.includes(user.role),
		decisions,
		askForm,
		// Only the roles that may hold a die may ask its owner for a decision.
		canAskOwner: DIE_EDITORS.includes(user.role)
	};
};

export const actions: Actions = {
	// Asks the owner of a die that is held already; the die stays held.
	askOwner: async (event) => {
		const user = requireRole(event, ...DIE_EDITORS);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(askOwnerSchema));
		if (!form.valid) return fail(400, { askForm: form });
		if (die.status !== 'held') {
			return message(form, 'Only a held die waits for its owner; hold it first.', { status: 409 });
		}
		const asked = await holdForOwnerDecision(
			getDb(),
			die,
			{
				question: form.data.ownerQuestion,
				quotedHours: form.data.quotedHours ?? null,
				quotedCost: form.data.quotedCost ?? null
			},
			'',
			user.id,
			null
		);
		if (!asked.ok) return message(form, asked.message, { status: 409 });
		return message(
			form,
			asked.ownersTold
				? "The owner's contacts are asked by e-mail and see the question in the portal."
				: 'The owner has no contact with e-mail notices on: the question waits in the portal.'
		);
	},
	status: async (event) => {
		const user = requireRole(event, ...PLANT_ROLES);
		const die = await loadPlantDie(event.params.number);
		const form = await superValidate(event.request, zod4(dieStatusSchema));
		if (!form.valid) return fail(400, { statusForm: form });
		const to = form.data.status as DieStatus;
		if (!allowedTargets(user.role, die.status).includes(to)) {
			return message(form, 'Your role may not move this die to that state.', { status: 403 });
		}
		const seen = form.data.seenBlocked >= 0 ? form.data.seenBlocked : null;
		if (to === 'held' && form.data.holdReason === 'owner_decision') {
			if (!DIE_EDITORS.includes(user.role)) {
				return message(form, 'Your role may not ask the owner for a decision.', { status: 403 });
			}
			const asked = await holdForOwnerDecision(
				getDb(),
				die,
				{
					question: form.data.ownerQuestion,
					quotedHours: form.data.quotedHours ?? null,
					quotedCost: form.data.quotedCost ?? null
				},
				form.data.reason,
				user.id,
				seen
			);
			if (!asked.ok) return message(form, asked.message, { status: 409 });
			const owners = asked.ownersTold
				? " The owner's contacts are asked by e-mail and see the question in the portal."
				: ' The owner has no contact with e-mail notices on: the question waits in the portal.';
			return message(form, `State changed.${owners}`);
		}
		const result = await moveDieState(
			getDb(),
			die,
			to,
			form.data.reason,
			user.id,
			seen,
			form.data.retirementReason || null
		);
		if (!result.ok) return message(form, result.message, { status: 409 });
		const told = result.consequence.changesBooking
			? result.queued
				? ' The production planners are told by e-mail.'
				: ' No production planner has notices switched on, so nobody was told by e-mail.'
			: '';
		return message(form, `State changed.${told}`);
	}
};
