import { realpathSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

/** True when the module at `moduleUrl` is the script node was started with (run on its own). */
export function isEntryPoint(moduleUrl: string): boolean {
	const script = process.argv[1];
	if (!script) return false;
	try {
		return realpathSync(script) === realpathSync(fileURLToPath(moduleUrl));
	} catch {
		return false;
	}
}
