// Bundles the CLI with esbuild: ESM with code splitting, so that each command is loaded only
// when used and mathjs is tree-shaken (see DEVELOPERS.md, "Start-up time").
import { build } from 'esbuild';

await build({
  entryPoints: { 'cli/main': 'src/cli/main.ts', index: 'src/index.ts' },
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
