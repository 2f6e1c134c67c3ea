import fs from 'node:fs';
const raw = fs.readFileSync('/tmp/owner-shot/statement.pdf').toString('latin1');
const pages = raw.split(/\/Type \/Page\b/).length - 1;
let out = '';
for (const m of raw.matchAll(/1 0 0 -?1 ([\d.]+) ([\d.]+) Tm[\s\S]*?\[([^\]]*)\]\s*TJ/g)) {
  const t = [...m[3].matchAll(/<([0-9a-f]*)>/gi)].map(h => Buffer.from(h[1],'hex').toString('latin1')).join('');
  out += t + '|';
}
console.log('pages', pages);
console.log(out.slice(0, 3000));
