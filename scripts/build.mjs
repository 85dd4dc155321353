// Bundles the CLI with esbuild: ESM with code splitting, so that each command is loaded only
// when used and mathjs is tree-shaken (see DEVELOPERS.md, "Start-up time").
import { build } from 'esbuild';

await build({
  entryPoints: { 'cli/main': 'src/cli/main.ts', index: 'src/index.ts', 'cli/check-worker': 'src/cli/check-worker.ts', 'analysis/sweep-worker': 'src/analysis/sweep-worker.ts', 'cli/run-worker': 'src/cli/run-worker.ts' },
  outdir: 'dist',
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  sourcemap: false,
  legalComments: 'none',
  logLevel: 'warning',
  banner: { js: "import { createRequire as __plenumCreateRequire } from 'node:module'; const require = __plenumCreateRequire(import.meta.url);" },
});
