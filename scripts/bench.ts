// Runs every scripts/bench-*.ts and prints one table: figure, value, target, ratio, pass/fail.
// Figures only — nothing here is a test assertion.
import fs from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import type { BenchFigure } from './lib/bench-report';

const dir = path.dirname(new URL(import.meta.url).pathname);
const only = process.argv.slice(2);
const files = fs
	.readdirSync(dir)
	.filter((f) => /^bench-.+\.ts$/.test(f))
	.filter((f) => only.length === 0 || only.some((o) => f.includes(o)))
	.sort();

const rows: (BenchFigure & { script: string })[] = [];
for (const file of files) {
	console.log(`\n▶ ${file}`);
	const started = Date.now();
	try {
		const mod = (await import(pathToFileURL(path.join(dir, file)).href)) as {
			run?: () => Promise<BenchFigure[]>;
		};
		if (typeof mod.run !== 'function') {
			console.log(`  (no run() export, skipped)`);
			continue;
		}
		for (const r of await mod.run()) rows.push({ ...r, script: file });
	} catch (err) {
		console.error(`  ${file} failed:`, err);
		rows.push({
			script: file,
			figure: 'script failed',
			value: NaN,
			unit: '',
			target: 'runs',
			pass: false
		});
	}
	console.log(`  (${((Date.now() - started) / 1000).toFixed(1)} s)`);
}

const fmt = (n: number) =>
	Number.isFinite(n) ? (Math.abs(n) >= 100 ? n.toFixed(0) : n.toPrecision(3)) : '—';
const table = rows.map((r) => ({
	figure: r.figure,
	value: `${fmt(r.value)} ${r.unit}`.trim(),
	target: r.target,
	ratio: r.ratio === undefined ? '' : fmt(r.ratio),
	result: r.pass ? 'pass' : 'FAIL'
}));
const widths = ['figure', 'value', 'target', 'ratio', 'result'].map((k) =>
	Math.max(k.length, ...table.map((t) => String(t[k as keyof typeof t]).length))
);
const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join(' | ');
console.log('\n' + line(['figure', 'value', 'target', 'ratio', 'result']));
console.log(widths.map((w) => '-'.repeat(w)).join('-|-'));
for (const t of table) console.log(line([t.figure, t.value, t.target, t.ratio, t.result]));
const failed = rows.filter((r) => !r.pass).length;
console.log(`\n${rows.length - failed} of ${rows.length} figures within target.`);
