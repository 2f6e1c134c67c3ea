import { isEntryPoint } from '../../fakes/entry-point';

/** One measured figure with its target; `npm run bench` collects these into one table. */
export interface BenchFigure {
	figure: string;
	value: number;
	unit: string;
	target: string;
	pass: boolean;
	ratio?: number;
}

/** Lets a bench script run on its own (`npx tsx scripts/bench-x.ts`) and print its figures. */
export async function runWhenCalledDirectly(moduleUrl: string, run: () => Promise<BenchFigure[]>) {
	if (!isEntryPoint(moduleUrl)) return;
	for (const f of await run()) {
		const ratio = f.ratio === undefined ? '' : ` (ratio ${f.ratio.toFixed(2)})`;
		console.log(
			`${f.figure}: ${f.value.toFixed(1)} ${f.unit}${ratio} (target ${f.target}) ${f.pass ? 'pass' : 'FAIL'}`
		);
	}
}
