// A repair quote in words, the same on the decision cards, in the owner's e-mail and in the die's
// history: hours and cost as the toolroom lead typed them (cost in the plant's own currency).

const money = new Intl.NumberFormat('en-GB', {
	minimumFractionDigits: 2,
	maximumFractionDigits: 2
});
const hoursFormat = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 2 });

/** "Quoted repair: 12 h, cost 1,850.00", or null when neither was given. */
export function describeQuote(hours: number | null, cost: number | null): string | null {
	const parts: string[] = [];
	if (hours !== null) parts.push(`${hoursFormat.format(hours)} h`);
	if (cost !== null) parts.push(`cost ${money.format(cost)}`);
	return parts.length ? `Quoted repair: ${parts.join(', ')}` : null;
}
