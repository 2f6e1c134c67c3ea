import fs from 'node:fs';
import { expect, test } from 'vitest';
import { accessMatrixMarkdown } from '../../scripts/access-matrix-doc';

test('DEVELOPERS.md shows the access matrix the e2e test enforces', () => {
	const doc = fs.readFileSync('DEVELOPERS.md', 'utf8');
	const start = doc.indexOf('<!-- access-matrix:start -->');
	const end = doc.indexOf('<!-- access-matrix:end -->');
	expect(start).toBeGreaterThan(0);
	expect(doc.slice(start, end).trim().split('\n').slice(1).join('\n').trim()).toBe(
		accessMatrixMarkdown().trim()
	);
});
