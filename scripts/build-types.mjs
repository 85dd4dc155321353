// Generates the library's type declarations (dist/types/esm, from src/index.ts) and a copy of them
// marked CommonJS (dist/types/cjs) for `require('plenum')`: TypeScript reads a .d.ts as ESM or
// CommonJS by the nearest package.json, and a CommonJS consumer must not be handed ESM types.
// Run by `npm run build` and before `npm pack`/`npm publish` (prepack); not by the tests' build,
// which needs only the bundles.
import { execFileSync } from 'node:child_process';
import { cpSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';

const tsc = createRequire(import.meta.url).resolve('typescript/bin/tsc');
rmSync('dist/types', { recursive: true, force: true });
execFileSync(process.execPath, [tsc, '-p', 'tsconfig.types.json'], { stdio: 'inherit' });
mkdirSync('dist/types/cjs', { recursive: true });
cpSync('dist/types/esm', 'dist/types/cjs', { recursive: true });
writeFileSync('dist/types/cjs/package.json', '{ "type": "commonjs" }\n');
