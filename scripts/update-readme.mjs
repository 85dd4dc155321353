// Regenerates the README's element table from the parameter tables (via the built CLI).
import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';

const table = execFileSync(process.execPath, ['bin/plenum', 'kinds', '--markdown'], { encoding: 'utf8' });
const readme = readFileSync('README.md', 'utf8');
const next = readme.replace(/<!-- kinds:begin -->[\s\S]*<!-- kinds:end -->/, `<!-- kinds:begin -->\n${table}<!-- kinds:end -->`);
writeFileSync('README.md', next);
