/**
 * A strict little XML well-formedness check for the SVG the report writes (W3C XML 1.0, §2.1
 * well-formed documents, §3.1 start-tags and end-tags, §4.1 character and entity references):
 * balanced tags, quoted attributes without `<`, unique attribute names, only the five predefined
 * entities and numeric references, no stray `<` or `&` in text. Returns the elements in document
 * order so tests can count them.
 */

export interface XmlElement { name: string; attrs: Record<string, string>; depth: number }

const NAME = /^[A-Za-z_:][A-Za-z0-9_.:-]*$/;
const ENTITY = /&(?:amp|lt|gt|quot|apos|#[0-9]+|#x[0-9a-fA-F]+);/g;

function checkText(s: string, where: string): void {
  if (s.includes('<')) throw new Error(`stray < in ${where}`);
  if (s.replace(ENTITY, '').includes('&')) throw new Error(`bare & in ${where}: ${s.slice(0, 80)}`);
}

function decode(s: string): string {
  return s.replace(ENTITY, (e) => {
    if (e === '&amp;') return '&';
    if (e === '&lt;') return '<';
    if (e === '&gt;') return '>';
    if (e === '&quot;') return '"';
    if (e === '&apos;') return "'";
    return String.fromCodePoint(e[2] === 'x' ? parseInt(e.slice(3, -1), 16) : parseInt(e.slice(2, -1), 10));
  });
}

/** Parses `xml` (one root element, optional XML declaration); throws on the first defect. */
export function parseXml(xml: string): XmlElement[] {
  const s = xml.replace(/^<\?xml [^?]*\?>\s*/, '');
  const out: XmlElement[] = [];
  const stack: string[] = [];
  let roots = 0;
  let i = 0;
  while (i < s.length) {
    const lt = s.indexOf('<', i);
    const textPart = lt < 0 ? s.slice(i) : s.slice(i, lt);
    if (stack.length === 0 && textPart.trim()) throw new Error(`text outside the root element: ${textPart.slice(0, 40)}`);
    checkText(textPart, 'text');
    if (lt < 0) break;
    if (s.startsWith('<!--', lt)) {
      const end = s.indexOf('-->', lt);
      if (end < 0) throw new Error('unterminated comment');
      i = end + 3;
      continue;
    }
    // the tag ends at the first '>' outside quotes
    let j = lt + 1;
    let quote = '';
    for (; j < s.length; j++) {
      const c = s[j];
      if (quote) { if (c === quote) quote = ''; continue; }
      if (c === '"' || c === "'") { quote = c; continue; }
      if (c === '>') break;
    }
    if (j >= s.length) throw new Error('unterminated tag');
    const inner = s.slice(lt + 1, j);
    i = j + 1;
    if (inner.startsWith('/')) {
      const name = inner.slice(1).trim();
      const open = stack.pop();
      if (open !== name) throw new Error(`</${name}> closes <${open}>`);
      continue;
    }
    const selfClose = inner.endsWith('/');
    const body = selfClose ? inner.slice(0, -1) : inner;
    const m = /^([^\s/>]+)([\s\S]*)$/.exec(body);
    if (!m || !NAME.test(m[1])) throw new Error(`bad tag name in <${inner.slice(0, 30)}>`);
    const attrs: Record<string, string> = {};
    let rest = m[2];
    const attrRe = /^\s+([A-Za-z_:][A-Za-z0-9_.:-]*)\s*=\s*("([^"]*)"|'([^']*)')/;
    for (;;) {
      const a = attrRe.exec(rest);
      if (!a) break;
      if (a[1] in attrs) throw new Error(`duplicate attribute ${a[1]} on <${m[1]}>`);
      const v = a[3] ?? a[4];
      checkText(v, `attribute ${a[1]} of <${m[1]}>`);
      attrs[a[1]] = decode(v);
      rest = rest.slice(a[0].length);
    }
    if (rest.trim()) throw new Error(`malformed attributes on <${m[1]}>: ${rest.slice(0, 40)}`);
    if (stack.length === 0) roots++;
    out.push({ name: m[1], attrs, depth: stack.length });
    if (!selfClose) stack.push(m[1]);
  }
  if (stack.length) throw new Error(`unclosed <${stack[stack.length - 1]}>`);
  if (roots !== 1) throw new Error(`expected one root element, found ${roots}`);
  return out;
}

/** Elements named `name` whose class list contains `cls`. */
export function withClass(els: XmlElement[], name: string, cls: string): XmlElement[] {
  return els.filter((e) => e.name === name && (e.attrs.class ?? '').split(/\s+/).includes(cls));
}
