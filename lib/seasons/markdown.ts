/**
 * A small, safe Markdown subset for season descriptions: headings (#, ##, ###), paragraphs,
 * bulleted and numbered lists, **bold**, *italic*, `code` and [links](https://…).
 * It parses into plain data that the React renderer turns into elements: no HTML string is ever
 * produced, so raw HTML in the text stays text, and only http(s), mailto and same-site links survive.
 * Client-safe and framework-free.
 */

export type Inline =
  | { type: 'text'; text: string }
  | { type: 'strong'; children: Inline[] }
  | { type: 'em'; children: Inline[] }
  | { type: 'code'; text: string }
  | { type: 'link'; href: string; children: Inline[] };

export type Block =
  | { type: 'heading'; level: 2 | 3 | 4; children: Inline[] }
  | { type: 'paragraph'; children: Inline[] }
  | { type: 'list'; ordered: boolean; items: Inline[][] };

/** Bounds keep a hostile description from costing much: text beyond this is cut. */
export const MARKDOWN_MAX_CHARS = 20_000;

export function safeHref(raw: string): string | null {
  const href = raw.trim();
  if (/^https?:\/\/[^\s]+$/i.test(href) || /^mailto:[^\s]+$/i.test(href)) return href;
  if (/^\/(?!\/)[^\s]*$/.test(href)) return href;
  return null;
}

export function parseInline(src: string, depth = 0): Inline[] {
  const out: Inline[] = [];
  let text = '';
  const flush = () => {
    if (text) out.push({ type: 'text', text });
    text = '';
  };
  let i = 0;
  while (i < src.length) {
    const rest = src.slice(i);
    let m: RegExpExecArray | null;
    if (rest[0] === '\\' && rest.length > 1 && /[\\`*_[\]()#-]/.test(rest[1])) {
      text += rest[1];
      i += 2;
      continue;
    }
    if (rest[0] === '`' && (m = /^`([^`]+)`/.exec(rest))) {
      flush();
      out.push({ type: 'code', text: m[1] });
      i += m[0].length;
      continue;
    }
    if (depth < 4 && rest.startsWith('**') && (m = /^\*\*(.+?)\*\*/.exec(rest))) {
      flush();
      out.push({ type: 'strong', children: parseInline(m[1], depth + 1) });
      i += m[0].length;
      continue;
    }
    if (depth < 4 && (rest[0] === '*' || rest[0] === '_') && (m = (rest[0] === '*' ? /^\*([^*\s](?:[^*]*[^*\s])?)\*/ : /^_([^_\s](?:[^_]*[^_\s])?)_/).exec(rest))) {
      flush();
      out.push({ type: 'em', children: parseInline(m[1], depth + 1) });
      i += m[0].length;
      continue;
    }
    if (depth < 4 && rest[0] === '[' && (m = /^\[([^\]]+)\]\(([^)\s]+)\)/.exec(rest))) {
      const href = safeHref(m[2]);
      flush();
      // An unsafe target (javascript:, data:, …) keeps its words and loses the link.
      if (href) out.push({ type: 'link', href, children: parseInline(m[1], depth + 1) });
      else out.push(...parseInline(m[1], depth + 1));
      i += m[0].length;
      continue;
    }
    text += rest[0];
    i += 1;
  }
  flush();
  return out;
}

export function parseMarkdown(source: string): Block[] {
  const lines = source.slice(0, MARKDOWN_MAX_CHARS).replace(/\r\n?/g, '\n').split('\n');
  const blocks: Block[] = [];
  let para: string[] = [];
  let list: { ordered: boolean; items: string[] } | null = null;
  const endPara = () => {
    if (para.length) blocks.push({ type: 'paragraph', children: parseInline(para.join(' ')) });
    para = [];
  };
  const endList = () => {
    if (list) blocks.push({ type: 'list', ordered: list.ordered, items: list.items.map((t) => parseInline(t)) });
    list = null;
  };
  for (const raw of lines) {
    const line = raw.trimEnd();
    let m: RegExpExecArray | null;
    if (!line.trim()) {
      endPara();
      endList();
    } else if ((m = /^(#{1,3})\s+(.*)$/.exec(line))) {
      endPara();
      endList();
      // Page titles are h1; description headings start one level below.
      blocks.push({ type: 'heading', level: (m[1].length + 1) as 2 | 3 | 4, children: parseInline(m[2]) });
    } else if ((m = /^\s*[-*+]\s+(.*)$/.exec(line)) || (m = /^\s*\d{1,3}[.)]\s+(.*)$/.exec(line))) {
      const ordered = /^\s*\d/.test(line);
      endPara();
      if (list && list.ordered !== ordered) endList();
      list ??= { ordered, items: [] };
      list.items.push(m[1]);
    } else if (list && /^\s{2,}\S/.test(line)) {
      list.items[list.items.length - 1] += ` ${line.trim()}`;
    } else {
      endList();
      para.push(line.trim());
    }
  }
  endPara();
  endList();
  return blocks;
}

/** The text without markup, e.g. for a list preview. */
export function plainText(source: string): string {
  const walk = (xs: Inline[]): string => xs.map((x) => ('children' in x ? walk(x.children) : x.text)).join('');
  return parseMarkdown(source)
    .map((b) => (b.type === 'list' ? b.items.map(walk).join(' · ') : walk(b.children)))
    .join(' ');
}
