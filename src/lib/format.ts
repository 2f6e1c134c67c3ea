// Display formatting shared by pages, exports and e-mails. Dates and times are plant time (see
// plant-time.ts); the zone is named once per page, export or e-mail, not on every value.
import { plantDate, plantDateTime } from './plant-time';

const integer = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 });

export const formatShots = (n: number | null | undefined) => (n == null ? '—' : integer.format(n));

/** Plant date `YYYY-MM-DD` of a stored instant; a bare date is shown as it is. */
export function formatDate(iso: string | null | undefined): string {
	if (!iso) return '—';
	if (/^\d{4}-\d{2}-\d{2}$/.test(iso)) return iso;
	return plantDate(iso);
}

/** `YYYY-MM-DD HH:mm` on the plant's clock. */
export function formatDateTime(iso: string | null | undefined): string {
	if (!iso) return '—';
	return plantDateTime(iso);
}

export const formatPct = (n: number) => `${n.toFixed(1)} %`;
