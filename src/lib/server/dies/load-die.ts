import { error } from '@sveltejs/kit';
import { getDb } from '../db';
import { findDie } from './die-detail';

/** The die named in a plant route, or a 404 page. */
export async function loadPlantDie(number: string) {
	const die = await findDie(getDb(), number, { customerId: null });
	if (!die) error(404, { message: `There is no die ${number}.` });
	return die;
}
