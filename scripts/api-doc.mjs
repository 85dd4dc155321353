// The library's API reference (docs/library.md), generated from src/index.ts with the
// TypeScript compiler: every export with its kind, its signature and the first paragraph of
// its doc comment. `npm run api-doc` rewrites the file; a test fails when it is stale.
import { readFileSync, writeFileSync } from 'node:fs';
import { pathToFileURL } from 'node:url';
import ts from 'typescript';

const INTRO = `# plenum as a library: API reference

Generated from \`src/index.ts\` by \`npm run api-doc\` (a test fails when an export is missing here).
Import from \`'plenum'\` (ESM) or \`require('plenum')\` (CommonJS); the README's *Library*
section has a worked example. All numbers are SI: pressure Pa absolute (\`gauge\` Pa gauge),
volume m³, mass kg, temperature K, time s, flow kg/s. Functions that read input return a
\`Result<T>\`: \`{ ok: true, value, warnings }\` or \`{ ok: false, diagnostics }\`, never throw
for bad input.
`;

/** Section of the page for each module the exports come from. */
const SECTIONS = [
  ['Reading and building a netlist', /\/(diag|netlist|model)\/|\/src\/index\.ts/],
  ['Simulating', /\/transient\/(transient|results|outcome)\b/],
  ['Outputs', /\/report\/(json|csv|table|junit|baseline)\b|\/transient\/trace-diff/],
  ['Reports and figures', /\/report\/(html|plots)\b|\/transient\/report-input/],
  ['Equilibria, stability, continuation', /\/equilibria\/|\/linalg\/|\/report\/equilibria/],
  ['Studies: sweeps and fitting', /\/studies\//],
  ['Everything else', /./],
];

function firstParagraph(text) {
  return text.split(/\n\s*\n/)[0].replace(/\s+/g, ' ').trim();
}

export function apiMarkdown() {
  const program = ts.createProgram(['src/index.ts'], {
    target: ts.ScriptTarget.ES2022, module: ts.ModuleKind.ESNext, moduleResolution: ts.ModuleResolutionKind.Bundler,
    strict: true, noEmit: true, skipLibCheck: true, types: ['node'],
  });
  const checker = program.getTypeChecker();
  const index = program.getSourceFile('src/index.ts');
  const entries = [];
  for (const exported of checker.getExportsOfModule(checker.getSymbolAtLocation(index))) {
    const symbol = exported.flags & ts.SymbolFlags.Alias ? checker.getAliasedSymbol(exported) : exported;
    const decl = symbol.declarations?.[0];
    if (!decl) continue;
    const file = decl.getSourceFile().fileName;
    const doc = firstParagraph(ts.displayPartsToString(symbol.getDocumentationComment(checker)));
    let kind;
    let signature;
    if (symbol.flags & ts.SymbolFlags.Function) {
      kind = 'function';
      const type = checker.getTypeOfSymbolAtLocation(symbol, decl);
      signature = type.getCallSignatures().map((s) => `${exported.name}${checker.signatureToString(s, undefined, ts.TypeFormatFlags.NoTruncation)}`).join('\n');
    } else if (symbol.flags & (ts.SymbolFlags.Interface | ts.SymbolFlags.TypeAlias)) {
      kind = symbol.flags & ts.SymbolFlags.Interface ? 'interface' : 'type';
      const type = checker.getDeclaredTypeOfSymbol(symbol);
      const flags = ts.TypeFormatFlags.NoTruncation | ts.TypeFormatFlags.InTypeAlias;
      if (kind === 'interface') {
        const members = type.getProperties().map((p) => {
          const pd = p.declarations?.[0];
          const optional = p.flags & ts.SymbolFlags.Optional ? '?' : '';
          const note = firstParagraph(ts.displayPartsToString(p.getDocumentationComment(checker)));
          const t = pd ? checker.typeToString(checker.getTypeOfSymbolAtLocation(p, pd), undefined, flags) : 'unknown';
          return `${note ? `  /** ${note} */\n` : ''}  ${p.name}${optional}: ${t};`;
        });
        signature = `interface ${exported.name} {\n${members.join('\n')}\n}`;
      } else {
        signature = `type ${exported.name} = ${checker.typeToString(type, decl, flags)}`;
      }
    } else if (symbol.flags & ts.SymbolFlags.Class) {
      kind = 'class';
      signature = `class ${exported.name}`;
    } else {
      kind = 'const';
      signature = `const ${exported.name}: ${checker.typeToString(checker.getTypeOfSymbolAtLocation(symbol, decl), undefined, ts.TypeFormatFlags.NoTruncation)}`;
    }
    entries.push({ name: exported.name, kind, signature, doc, file: file.replace(/^.*?\bsrc\//, 'src/') });
  }
  const out = [INTRO];
  const placed = new Set();
  for (const [title, pattern] of SECTIONS) {
    const mine = entries.filter((e) => !placed.has(e.name) && pattern.test('/' + e.file)).sort((a, b) => (a.kind === b.kind ? a.name.localeCompare(b.name) : a.kind === 'function' ? -1 : b.kind === 'function' ? 1 : a.kind.localeCompare(b.kind) || a.name.localeCompare(b.name)));
    if (!mine.length) continue;
    out.push(`## ${title}\n`);
    for (const e of mine) {
      placed.add(e.name);
      out.push(`### \`${e.name}\` (${e.kind}, \`${e.file}\`)\n`, '```ts', e.signature, '```', '', e.doc ? `${e.doc}\n` : '');
    }
  }
  return out.join('\n').replace(/\n{3,}/g, '\n\n').trimEnd() + '\n';
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  const text = apiMarkdown();
  const path = 'docs/library.md';
  let old = '';
  try { old = readFileSync(path, 'utf8'); } catch { /* first time */ }
  if (old !== text) writeFileSync(path, text);
}
