import QRCode from 'qrcode';
import { env } from '$env/dynamic/private';
import { requireRole } from '$lib/server/auth/guard';
import { loadPlantDie } from '$lib/server/dies/load-die';
import { PLANT_ROLES } from '$lib/roles';
import type { PageServerLoad } from './$types';

// The label page resets to the root layout (+page@.svelte), so it loads its own die.
export const load: PageServerLoad = async (event) => {
	requireRole(event, ...PLANT_ROLES);
	const die = await loadPlantDie(event.params.number);
	// ORIGIN is the address phones reach the app at; behind a proxy the request's own origin may
	// be an internal one.
	const origin = (env.ORIGIN || event.url.origin).replace(/\/+$/, '');
	const url = `${origin}/dies/${encodeURIComponent(die.number)}`;
	// Error correction M survives a scuffed label on a toolroom rack; margin 0 because the label
	// layout supplies the quiet zone.
	const qrSvg = await QRCode.toString(url, { type: 'svg', errorCorrectionLevel: 'M', margin: 0 });
	return {
		die: {
			number: die.number,
			partName: die.part_name,
			partNumber: die.part_number,
			customerName: die.customerName,
			alloyName: die.alloyName,
			family: die.family,
			status: die.status
		},
		url,
		qrSvg
	};
};
