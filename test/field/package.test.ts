/**
 * The package as a consumer gets it: `npm pack`, installed into a scratch project, the README's
 * library example type-checked under the strictest common compiler flags (strict,
 * noUncheckedIndexedAccess, exactOptionalPropertyTypes, no skipLibCheck), as ESM (nodenext)
 * and as CommonJS (node16 `require` and the older node10 resolution), then compiled and run.
 * No registry is used: the package has no run-time dependencies and the compiler and Node's
 * types come from this repository's node_modules.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { builtinModules } from 'node:module';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { apiMarkdown } from '../../scripts/api-doc.mjs';

const ROOT = resolve('.');
const TSC = join(ROOT, 'node_modules/typescript/bin/tsc');
const tmp = mkdtempSync(join(tmpdir(), 'plenum-pack-'));
const STRICT = { strict: true, noUncheckedIndexedAccess: true, exactOptionalPropertyTypes: true, noImplicitOverride: true, noPropertyAccessFromIndexSignature: true, skipLibCheck: false, typeRoots: [join(ROOT, 'node_modules/@types')], types: ['node'], target: 'ES2022', lib: ['ES2022'], outDir: 'out' };

interface PackFile { path: string; size: number }
let files: PackFile[] = [];
let tarball = '';
let size = 0;

/** The README's library example (the first ts block of its Library section). */
function readmeExample(): string {
  const readme = readFileSync('README.md', 'utf8');
  const section = readme.slice(readme.indexOf('## Library'));
  const m = /```ts\n([\s\S]*?)```/.exec(section);
  if (!m?.[1]) throw new Error('no ts example in the README Library section');
  return m[1];
}

function project(name: string, type: 'module' | 'commonjs', compilerOptions: Record<string, unknown>, file: string): string {
  const dir = join(tmp, name);
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, 'package.json'), JSON.stringify({ name: `consumer-${name}`, private: true, type, dependencies: { plenum: `file:${tarball}` } }, null, 2));
  const r = spawnSync('npm', ['install', '--offline', '--no-audit', '--no-fund', '--ignore-scripts'], { cwd: dir, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`npm install in ${name} failed:\n${r.stderr}`);
  writeFileSync(join(dir, 'tsconfig.json'), JSON.stringify({ compilerOptions: { ...STRICT, ...compilerOptions }, files: [file] }, null, 2));
  writeFileSync(join(dir, file), readmeExample());
  cpSync('networks/cushion-settle.yaml', join(dir, 'rig.yaml'));
  return dir;
}

function tsc(dir: string): { code: number; out: string } {
  const r = spawnSync(process.execPath, [TSC, '-p', 'tsconfig.json'], { cwd: dir, encoding: 'utf8' });
  return { code: r.status ?? -1, out: r.stdout + r.stderr };
}

beforeAll(() => {
  // the bundles are built by the test setup; the declarations are what `npm pack` adds
  execFileSync(process.execPath, ['scripts/build-types.mjs'], { stdio: 'pipe' });
  const out = execFileSync('npm', ['pack', '--ignore-scripts', '--json', '--pack-destination', tmp], { encoding: 'utf8' });
  const info = JSON.parse(out)[0] as { filename: string; files: PackFile[]; size: number };
  tarball = join(tmp, info.filename);
  files = info.files;
  size = info.size;
}, 240_000);

describe('the packed package', () => {
  it('holds what a user needs and none of the development files', () => {
    const paths = files.map((f) => f.path);
    for (const need of ['package.json', 'README.md', 'LICENSE', 'bin/plenum', 'dist/index.js', 'dist/cli/main.js', 'dist/cjs/index.js', 'dist/types/esm/index.d.ts', 'dist/types/cjs/index.d.ts', 'dist/THIRD-PARTY-NOTICES.txt']) {
      expect(paths, need).toContain(need);
    }
    for (const p of paths) expect(p).not.toMatch(/^(test|bench|src|scripts|types|\.ci)\/|^docs\/dev-|^tsconfig|^vitest/);
    // the bundles (ESM and CommonJS), two declaration trees, docs and examples: under 1.5 MB
    // packed; an accidental node_modules, test corpus or trace would be far above
    expect(size).toBeLessThan(1_500_000);
    expect(files.length).toBeLessThan(400);
  });

  it('declares no run-time dependencies: the bundle carries them, with their licences and notices', () => {
    const pkg = JSON.parse(readFileSync('package.json', 'utf8')) as { dependencies?: Record<string, string>; exports: Record<string, unknown> };
    expect(Object.keys(pkg.dependencies ?? {})).toEqual([]);
    // no bundled file imports a package that would then be missing
    const bundles = files.map((f) => f.path).filter((p) => /^dist\/.*\.js$/.test(p));
    for (const b of bundles) {
      const text = readFileSync(b, 'utf8');
      const bare = [...text.matchAll(/(?:from\s*|import\(|require\()["']([^"'./][^"']*)["']/g)].map((m) => m[1]!).filter((s) => /^(@[a-z0-9-]+\/)?[a-z0-9][a-z0-9._-]*(\/[\w./-]+)?$/.test(s)).filter((s) => !s.startsWith('node:') && !builtinModules.includes(s))
        // fdir looks for picomatch inside try/catch, as an option; picomatch is bundled anyway
        .filter((s) => !(s === 'picomatch' && text.includes('try{__require.resolve("picomatch")')));
      expect(bare, b).toEqual([]);
    }
    const notices = readFileSync('dist/THIRD-PARTY-NOTICES.txt', 'utf8');
    for (const dep of ['mathjs', 'yaml', 'commander', 'odex', 'tinyglobby', 'decimal.js', 'complex.js', 'fraction.js', 'typed-function']) expect(notices).toMatch(new RegExp(`^${dep.replace('.', '\\.')} \\S+ \\(`, 'm'));
    // mathjs is Apache-2.0, whose §4(d) asks for its NOTICE to be passed on
    expect(notices).toContain(readFileSync('node_modules/mathjs/NOTICE', 'utf8').trim().split('\n')[0]);
    expect(readFileSync('LICENSE', 'utf8')).toMatch(/^MIT License/);
  });

  it('type-checks the README example as ESM (module nodenext) under the strictest flags and runs it', () => {
    const dir = project('esm', 'module', { module: 'nodenext', moduleResolution: 'nodenext' }, 'main.ts');
    const c = tsc(dir);
    expect(c.out).toBe('');
    expect(c.code).toBe(0);
    const run = spawnSync(process.execPath, ['out/main.js'], { cwd: dir, encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(/cell_a ends at 15\.5\d kPa gauge/);
    expect(run.stdout).toContain('completed');
  }, 120_000);

  it('type-checks and runs as CommonJS through the `require` condition (module node16)', () => {
    const dir = project('cjs', 'commonjs', { module: 'node16', moduleResolution: 'node16' }, 'main.ts');
    const c = tsc(dir);
    expect(c.out).toBe('');
    const js = readFileSync(join(dir, 'out/main.js'), 'utf8');
    expect(js).toContain('require("plenum")');
    const run = spawnSync(process.execPath, ['out/main.js'], { cwd: dir, encoding: 'utf8' });
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(/cell_a ends at 15\.5\d kPa gauge/);
  }, 120_000);

  it('type-checks under the older CommonJS resolution (module commonjs, moduleResolution node10)', () => {
    const dir = project('node10', 'commonjs', { module: 'commonjs', moduleResolution: 'node10' }, 'main.ts');
    const c = tsc(dir);
    expect(c.out).toBe('');
    expect(c.code).toBe(0);
    expect(existsSync(join(dir, 'node_modules/plenum/dist/types/esm/index.d.ts'))).toBe(true);
  }, 120_000);
});

describe('the API reference', () => {
  it('docs/library.md documents every export of src/index.ts (run `npm run api-doc` to regenerate it)', () => {
    const names = (md: string): string[] => [...md.matchAll(/^### `([^`]+)`/gm)].map((m) => m[1]!).sort();
    const exported = names(apiMarkdown());
    expect(exported.length).toBeGreaterThan(50);
    expect(names(readFileSync('docs/library.md', 'utf8'))).toEqual(exported);
  }, 60_000);
});
