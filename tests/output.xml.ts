// A strict little XML reader for the golden-structure tests of the output pictures and files.

export interface XmlNode { name: string; attrs: Record<string, string>; children: XmlNode[]; text: string; parent: XmlNode | null }

const NAME = /^[A-Za-z_][\w:.-]*/;
const ENTITY = /^&(amp|lt|gt|quot|apos|#\d+|#x[0-9a-fA-F]+);/;

/** Parse a whole document; throws on anything not well formed (nesting, quotes, entities, one root). */
export function parseXml(s: string): XmlNode {
  let i = 0;
  const fail = (msg: string): never => { throw new Error(`${msg} at ${i}: ${JSON.stringify(s.slice(Math.max(0, i - 40), i + 40))}`); };
  const checkText = (t: string): void => {
    for (let k = t.indexOf('&'); k >= 0; k = t.indexOf('&', k + 1)) if (!ENTITY.test(t.slice(k, k + 12))) fail('bad entity');
    if (t.includes('<')) fail('stray <');
  };
  if (s.startsWith('<?xml')) { i = s.indexOf('?>') + 2; if (i < 2) fail('open prolog'); }
  const stack: XmlNode[] = [];
  let root: XmlNode | null = null;
  while (i < s.length) {
    const lt = s.indexOf('<', i);
    const chunk = lt < 0 ? s.slice(i) : s.slice(i, lt);
    if (!stack.length && chunk.trim()) fail('text outside the root');
    checkText(chunk);
    if (stack.length) stack[stack.length - 1].text += chunk;
    if (lt < 0) break;
    i = lt;
    if (s.startsWith('<!--', i)) { const e = s.indexOf('-->', i); if (e < 0) fail('open comment'); i = e + 3; continue; }
    if (s.startsWith('</', i)) {
      const m = NAME.exec(s.slice(i + 2, i + 200));
      const top = stack.pop();
      if (!m || !top || top.name !== m[0]) fail(`end tag ${m?.[0]} does not close ${top?.name}`);
      i = s.indexOf('>', i) + 1;
      continue;
    }
    const m = NAME.exec(s.slice(i + 1, i + 200));
    if (!m) fail('bad tag name');
    const node: XmlNode = { name: m![0], attrs: {}, children: [], text: '', parent: stack[stack.length - 1] ?? null };
    i += 1 + m![0].length;
    for (;;) {
      while (/\s/.test(s[i])) i++;
      if (s.startsWith('/>', i)) { i += 2; break; }
      if (s[i] === '>') { i++; stack.push(node); break; }
      const a = /^([A-Za-z_][\w:.-]*)="([^"<]*)"/.exec(s.slice(i, i + 100000));
      if (!a) fail('bad attribute');
      if (a![1] in node.attrs) fail(`repeated attribute ${a![1]}`);
      checkText(a![2]);
      node.attrs[a![1]] = a![2];
      i += a![0].length;
    }
    if (node.parent) node.parent.children.push(node);
    else if (root) fail('second root'); else root = node;
  }
  if (stack.length) fail(`unclosed ${stack[stack.length - 1].name}`);
  if (!root) fail('no root');
  return root!;
}

/** Every node below (and including) n, in document order. */
export function allNodes(n: XmlNode): XmlNode[] {
  const out: XmlNode[] = [n];
  for (const c of n.children) out.push(...allNodes(c));
  return out;
}

/** The node with this id. */
export function byId(root: XmlNode, id: string): XmlNode | undefined {
  return allNodes(root).find((e) => e.attrs.id === id);
}

/** All text content below n, entities left as written. */
export function textOf(n: XmlNode): string {
  return n.text + n.children.map(textOf).join('');
}

/** Text of each text element, in order. */
export function texts(root: XmlNode): string[] {
  return allNodes(root).filter((e) => e.name === 'text').map(textOf);
}
