// Bundles the CLI and the library with esbuild: ESM with code splitting, so that each command
// is loaded only when used and mathjs is tree-shaken (see DEVELOPERS.md, "Start-up time"); a
// CommonJS build of the library for `require('plenum')`; and the licences and notices of every
// bundled dependency (the bundles drop legal comments, so their texts ship beside them).
import { existsSync, mkdirSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { build } from 'esbuild';
import { thirdPartyNotices } from './notices.mjs';

// chunk names carry content hashes: start empty so that old chunks do not pile up; the type
// declarations (scripts/build-types.mjs, slower) are kept
if (existsSync('dist')) for (const f of readdirSync('dist')) if (f !== 'types') rmSync(join('dist', f), { recursive: true, force: true });

const common = {
  bundle: true,
  platform: 'node',
  target: 'node20',
  sourcemap: false,
  minifyWhitespace: true,
  minifySyntax: true,
  legalComments: 'none',
  logLevel: 'warning',
  metafile: true,
};

const esm = await build({
  ...common,
  entryPoints: { 'cli/main': 'src/cli/main.ts', index: 'src/index.ts', 'cli/check-worker': 'src/cli/check-worker.ts', 'studies/sweep-worker': 'src/studies/sweep-worker.ts', 'studies/eval-worker': 'src/studies/eval-worker.ts', 'cli/run-worker': 'src/cli/run-worker.ts' },
  outdir: 'dist',
  splitting: true,
  format: 'esm',
  banner: { js: "import { createRequire as __plenumCreateRequire } from 'node:module'; const require = __plenumCreateRequire(import.meta.url);" },
});

// The library for CommonJS consumers: one file in a folder marked CommonJS. `import.meta.url`
// (used to find the sweep worker, an ESM file in dist/studies/) becomes this file's URL.
const cjs = await build({
  ...common,
  entryPoints: ['src/index.ts'],
  outfile: 'dist/cjs/index.js',
  format: 'cjs',
  define: { 'import.meta.url': '__plenumModuleUrl' },
  banner: { js: "const __plenumModuleUrl = require('node:url').pathToFileURL(__filename).href;" },
});
mkdirSync('dist/cjs', { recursive: true });
writeFileSync('dist/cjs/package.json', '{ "type": "commonjs" }\n');

writeFileSync('dist/THIRD-PARTY-NOTICES.txt', thirdPartyNotices([esm.metafile, cjs.metafile]));
