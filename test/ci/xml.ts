/**
 * A small strict XML 1.0 well-formedness parser for tests (W3C XML 1.0, 5th ed., §2.1 document,
 * §2.2 Char, §2.3 Name, §2.4 CharData, §3.1 start-tags and attributes, §4.1 references). It
 * throws on anything a conforming parser would reject in the documents plenum writes: bad
 * nesting, a second root, raw `<` or `&` in text or attributes, unknown entities, duplicate
 * attributes, characters outside the Char production. DTDs are not supported (none are written).
 */

export interface XmlElement {
  name: string;
  attrs: Record<string, string>;
  children: (XmlElement | string)[];
}

const NAME = /^[A-Za-z_:][-A-Za-z0-9_:.]*/;
const ENTITIES: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', apos: "'" };

function isXmlChar(cp: number): boolean {
  return cp === 0x9 || cp === 0xa || cp === 0xd || (cp >= 0x20 && cp <= 0xd7ff) || (cp >= 0xe000 && cp <= 0xfffd) || (cp >= 0x10000 && cp <= 0x10ffff);
}

export function parseXml(text: string): XmlElement {
  // every character must match the Char production (lone surrogates fail here too)
  for (let i = 0; i < text.length; i++) {
    const cp = text.codePointAt(i)!;
    if (cp >= 0xd800 && cp <= 0xdfff) throw new Error(`lone surrogate at offset ${i}`);
    if (!isXmlChar(cp)) throw new Error(`character U+${cp.toString(16).padStart(4, '0')} not allowed at offset ${i}`);
    if (cp > 0xffff) i++;
  }
  let i = 0;
  const fail = (why: string): never => { throw new Error(`${why} at offset ${i}: ${JSON.stringify(text.slice(i, i + 40))}`); };
  const skipSpace = (): void => { while (i < text.length && /[ \t\r\n]/.test(text[i])) i++; };
  const name = (): string => {
    const m = NAME.exec(text.slice(i));
    if (!m) fail('expected a name');
    i += m![0].length;
    return m![0];
  };
  const decode = (s: string, inAttr: boolean): string => {
    if (s.includes('<')) fail(`raw < in ${inAttr ? 'an attribute' : 'text'}`);
    return s.replace(/&([^;]*);|&/g, (all, ref: string | undefined) => {
      if (ref === undefined) fail('raw & (not a reference)');
      if (ref!.startsWith('#x')) {
        if (!/^#x[0-9A-Fa-f]+$/.test(ref!)) fail(`bad character reference &${ref};`);
        const cp = parseInt(ref!.slice(2), 16);
        if (!isXmlChar(cp)) fail(`character reference to a non-Char &${ref};`);
        return String.fromCodePoint(cp);
      }
      if (ref!.startsWith('#')) {
        if (!/^#[0-9]+$/.test(ref!)) fail(`bad character reference &${ref};`);
        const cp = Number(ref!.slice(1));
        if (!isXmlChar(cp)) fail(`character reference to a non-Char &${ref};`);
        return String.fromCodePoint(cp);
      }
      if (!(ref! in ENTITIES)) fail(`unknown entity &${ref};`);
      void all;
      return ENTITIES[ref!];
    });
  };
  const misc = (): void => {
    for (;;) {
      skipSpace();
      if (text.startsWith('<!--', i)) {
        const end = text.indexOf('-->', i + 4);
        if (end < 0) fail('unterminated comment');
        if (text.slice(i + 4, end).includes('--')) fail('-- inside a comment');
        i = end + 3;
      } else if (text.startsWith('<?', i) && !text.startsWith('<?xml', i)) {
        const end = text.indexOf('?>', i);
        if (end < 0) fail('unterminated processing instruction');
        i = end + 2;
      } else return;
    }
  };
  const element = (): XmlElement => {
    if (text[i] !== '<') fail('expected <');
    i++;
    const el: XmlElement = { name: name(), attrs: {}, children: [] };
    for (;;) {
      const hadSpace = /[ \t\r\n]/.test(text[i] ?? '');
      skipSpace();
      if (text.startsWith('/>', i)) { i += 2; return el; }
      if (text[i] === '>') { i++; break; }
      if (!hadSpace) fail('attributes must be separated by white space');
      const an = name();
      skipSpace();
      if (text[i] !== '=') fail('expected =');
      i++;
      skipSpace();
      const q = text[i];
      if (q !== '"' && q !== "'") fail('attribute value must be quoted');
      const end = text.indexOf(q, i + 1);
      if (end < 0) fail('unterminated attribute value');
      if (an in el.attrs) fail(`duplicate attribute ${an}`);
      el.attrs[an] = decode(text.slice(i + 1, end), true);
      i = end + 1;
    }
    for (;;) {
      const lt = text.indexOf('<', i);
      if (lt < 0) fail(`element <${el.name}> is not closed`);
      const chunk = text.slice(i, lt);
      if (chunk.includes(']]>')) fail(']]> in text');
      if (chunk) el.children.push(decode(chunk, false));
      i = lt;
      if (text.startsWith('</', i)) {
        i += 2;
        const closing = name();
        if (closing !== el.name) fail(`</${closing}> closes <${el.name}>`);
        skipSpace();
        if (text[i] !== '>') fail('expected >');
        i++;
        return el;
      }
      if (text.startsWith('<!--', i)) {
        const end = text.indexOf('-->', i + 4);
        if (end < 0) fail('unterminated comment');
        i = end + 3;
        continue;
      }
      if (text.startsWith('<![CDATA[', i)) {
        const end = text.indexOf(']]>', i);
        if (end < 0) fail('unterminated CDATA');
        el.children.push(text.slice(i + 9, end));
        i = end + 3;
        continue;
      }
      if (text.startsWith('<!', i) || text.startsWith('<?', i)) fail('unsupported markup');
      el.children.push(element());
    }
  };
  if (text.startsWith('\uFEFF')) i = 1;
  if (text.startsWith('<?xml', i)) {
    const end = text.indexOf('?>', i);
    if (end < 0) fail('unterminated XML declaration');
    if (!/^<\?xml\s+version=(["'])1\.[0-9]+\1(\s+encoding=(["'])[A-Za-z][-A-Za-z0-9._]*\3)?(\s+standalone=(["'])(yes|no)\5)?\s*$/.test(text.slice(i, end))) fail('malformed XML declaration');
    i = end + 2;
  }
  misc();
  if (text.startsWith('<!DOCTYPE', i)) fail('DTDs are not supported by this checker');
  const root = element();
  misc();
  if (i !== text.length) fail('content after the root element');
  return root;
}

/** Child elements named `name`. */
export function children(el: XmlElement, name: string): XmlElement[] {
  return el.children.filter((c): c is XmlElement => typeof c !== 'string' && c.name === name);
}

/** The concatenated text inside an element. */
export function textOf(el: XmlElement): string {
  return el.children.map((c) => (typeof c === 'string' ? c : textOf(c))).join('');
}
