// Display formatting shared by pages, exports and e-mails.
const integer = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 0 });

export const formatShots = (n: number | null | undefined) => (n == null ? '—' : integer.format(n));

export function formatDate(iso: string | null | undefined): string {
	if (!iso) return '—';
	return iso.slice(0, 10);
}

export function formatDateTime(iso: string | null | undefined): string {
	if (!iso) return '—';
	return `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;
}

export const formatPct = (n: number) => `${n.toFixed(1)} %`;
