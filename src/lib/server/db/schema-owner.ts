// Tables of the owner-decision area; added to the Database interface in schema.ts.
import type { Generated, Selectable } from 'kysely';

/** What a die's owner may answer when the toolroom lead asks for a decision. */
export type OwnerAnswer = 'approve_repair' | 'order_replacement' | 'retire' | 'write_back';

export interface OwnerDecisionsTable {
	id: Generated<number>;
	die_id: number;
	/** What the lead asks, in the lead's words. */
	question: string;
	/** Quoted repair hours and cost (plant's currency), when the lead gives them. */
	quoted_hours: number | null;
	quoted_cost: number | null;
	asked_by: string | null;
	asked_at: string;
	/** Null while the question is open; one answer per question. */
	answer: OwnerAnswer | null;
	/** The owner's words: required for write_back, optional with the other answers. */
	answer_text: string | null;
	answered_by: string | null;
	answered_at: string | null;
}

export interface OwnerDecisionTables {
	owner_decisions: OwnerDecisionsTable;
}

export type OwnerDecisionRow = Selectable<OwnerDecisionsTable>;
