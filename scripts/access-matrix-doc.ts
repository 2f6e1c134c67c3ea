// Prints the declared access matrix (tests/e2e/access-table.ts) as Markdown for DEVELOPERS.md.
import { ACTIONS, ENDPOINTS, PAGES, PRINCIPALS } from '../tests/e2e/access-table';

export function accessMatrixMarkdown(): string {
	const header = `| route | ${PRINCIPALS.join(' | ')} |\n|---|${PRINCIPALS.map(() => '---').join('|')}|`;
	const rows = (title: string, table: Record<string, Record<string, string>>, prefix = '') =>
		[`| **${title}** |${PRINCIPALS.map(() => ' ').join('|')}|`]
			.concat(
				Object.entries(table).map(
					([k, cells]) => `| \`${prefix}${k}\` | ${PRINCIPALS.map((p) => cells[p]).join(' | ')} |`
				)
			)
			.join('\n');
	return [
		header,
		rows('pages (GET)', PAGES),
		rows('form actions (POST)', ACTIONS),
		rows('endpoints', ENDPOINTS)
	].join('\n');
}

if (import.meta.url === `file://${process.argv[1]}`) console.log(accessMatrixMarkdown());
