// The licences and notices of the packages bundled into dist/: every package with a file among
// the bundles' inputs (esbuild's metafile), its licence name, its LICENSE text and its NOTICE
// when it has one (Apache-2.0 §4(d) asks for the NOTICE to travel with the work).
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';

/** The MIT licence, for a package that declares it but ships no licence file of its own. */
const MIT = `Permission is hereby granted, free of charge, to any person obtaining a copy of this software
and associated documentation files (the "Software"), to deal in the Software without
restriction, including without limitation the rights to use, copy, modify, merge, publish,
distribute, sublicense, and/or sell copies of the Software, and to permit persons to whom the
Software is furnished to do so, subject to the following conditions:

The above copyright notice and this permission notice shall be included in all copies or
substantial portions of the Software.

THE SOFTWARE IS PROVIDED "AS IS", WITHOUT WARRANTY OF ANY KIND, EXPRESS OR IMPLIED, INCLUDING
BUT NOT LIMITED TO THE WARRANTIES OF MERCHANTABILITY, FITNESS FOR A PARTICULAR PURPOSE AND
NONINFRINGEMENT. IN NO EVENT SHALL THE AUTHORS OR COPYRIGHT HOLDERS BE LIABLE FOR ANY CLAIM,
DAMAGES OR OTHER LIABILITY, WHETHER IN AN ACTION OF CONTRACT, TORT OR OTHERWISE, ARISING FROM,
OUT OF OR IN CONNECTION WITH THE SOFTWARE OR THE USE OR OTHER DEALINGS IN THE SOFTWARE.`;

/**
 * Source files of this project carried over from a package (its licence travels with them):
 * the file and the package it came from.
 */
const CARRIED = [{ file: 'src/solve/odex-core.ts', from: 'node_modules/odex' }];

/**
 * Package directories (`node_modules/a`, `node_modules/@s/b`, nested too) behind the inputs,
 * each with the input files taken from it; code carried over into src/ counts for its package.
 */
export function bundledPackages(metafiles) {
  const dirs = new Map();
  for (const meta of metafiles) {
    for (const input of Object.keys(meta.inputs)) {
      const carried = CARRIED.find((c) => input === c.file);
      if (carried) {
        if (!dirs.has(carried.from)) dirs.set(carried.from, new Set());
        continue;
      }
      const m = /^(.*node_modules\/(?:@[^/]+\/)?[^/]+)\//.exec(input);
      if (!m) continue;
      if (!dirs.has(m[1])) dirs.set(m[1], new Set());
      dirs.get(m[1]).add(input);
    }
  }
  return [...dirs.keys()].sort().map((dir) => ({ dir, inputs: [...dirs.get(dir)].sort() }));
}

/** The first block comment of a file (where a package without a licence file names its author). */
function headerComment(file) {
  const m = /^\s*(\/\*[\s\S]*?\*\/)/.exec(readFileSync(file, 'utf8'));
  return m ? m[1] : '';
}

function legalFiles(dir) {
  return readdirSync(dir).filter((f) => /^(licen[cs]e|copying|notice)(\.|$|-)/i.test(f)).sort();
}

export function thirdPartyNotices(metafiles) {
  const out = [
    'plenum bundles the following packages into dist/. Their licences and notices follow,',
    'as each package ships them.',
    '',
  ];
  for (const { dir, inputs } of bundledPackages(metafiles)) {
    const pkg = JSON.parse(readFileSync(join(dir, 'package.json'), 'utf8'));
    const files = legalFiles(dir);
    out.push('='.repeat(78), `${pkg.name} ${pkg.version} (${pkg.license ?? 'see below'})`, pkg.homepage ?? '', '='.repeat(78));
    for (const f of files) out.push('', `--- ${f} ---`, readFileSync(join(dir, f), 'utf8').trimEnd());
    if (!files.length) {
      // no licence file: its copyright notice is in its source header, which bundling strips
      if (pkg.license !== 'MIT') throw new Error(`${pkg.name}: bundled, ships no licence file, and its licence (${pkg.license}) is not one this script knows`);
      const headers = [...new Set(inputs.map(headerComment).filter(Boolean))];
      out.push('', '--- the package ships no licence file; its source header and package.json say MIT ---', ...headers, pkg.author ? `author: ${typeof pkg.author === 'string' ? pkg.author : pkg.author.name}` : '', '', MIT);
    }
    out.push('');
  }
  return out.join('\n') + '\n';
}

