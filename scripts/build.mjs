// Bundles the CLI with esbuild: ESM with code splitting, so that each command is loaded only
// when used and mathjs is tree-shaken (see DEVELOPERS.md, "Start-up time").
import { rmSync } from 'node:fs';
import { build } from 'esbuild';

// chunk names carry content hashes: start empty so that old chunks do not pile up
rmSync('dist', { recursive: true, force: true });

await build({
  entryPoints: { 'cli/main': 'src/cli/main.ts', index: 'src/index.ts', 'cli/check-worker': 'src/cli/check-worker.ts', 'studies/sweep-worker': 'src/studies/sweep-worker.ts', 'studies/eval-worker': 'src/studies/eval-worker.ts', 'cli/run-worker': 'src/cli/run-worker.ts' },
  outdir: 'dist',
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  sourcemap: false,
  minifyWhitespace: true,
  minifySyntax: true,
  legalComments: 'none',
  logLevel: 'warning',
  banner: { js: "import { createRequire as __plenumCreateRequire } from 'node:module'; const require = __plenumCreateRequire(import.meta.url);" },
});
