// Makes sure Debian's Chromium is there for Playwright; installs it with apt-get when missing.
import { execSync } from 'node:child_process';
import fs from 'node:fs';

const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';

if (fs.existsSync(CHROMIUM)) process.exit(0);
console.log(`Chromium is not at ${CHROMIUM}; installing Debian's chromium package…`);
const asRoot = process.getuid?.() === 0 ? '' : 'sudo ';
try {
	execSync(
		`${asRoot}apt-get update -qq && ${asRoot}env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq chromium`,
		{
			stdio: 'inherit'
		}
	);
} catch {
	console.error(
		'Could not install Chromium. Install it yourself with `sudo apt-get install chromium` ' +
			'(Debian/Ubuntu), or point CHROMIUM_PATH at a Chromium or Chrome binary, then run npm test again.'
	);
	process.exit(1);
}
if (!fs.existsSync(CHROMIUM)) {
	console.error(`apt-get finished but ${CHROMIUM} is still missing; set CHROMIUM_PATH.`);
	process.exit(1);
}
