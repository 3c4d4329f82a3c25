/**
 * A small Markdown subset -> HTML, enough for report prose without a Markdown dependency:
 * headings (#..######), paragraphs, "-"/"*" and "1." lists, `code`, **bold**, *italic*,
 * [links](url). Everything else is shown as text. Input is escaped first, so raw HTML in the
 * Markdown is displayed, not interpreted.
 */
import { escapeHtml } from './escape-html';

function inline(text: string): string {
  const codeSpans: string[] = [];
  let out = escapeHtml(text).replace(/`([^`]+)`/g, (_m, code: string) => {
    codeSpans.push(`<code>${code}</code>`);
    return `\u0000${codeSpans.length - 1}\u0000`;
  });
  out = out
    .replace(/\*\*([^*]+)\*\*/g, '<strong>$1</strong>')
    .replace(/\*([^*\s][^*]*)\*/g, '<em>$1</em>')
    .replace(/(^|[^\w])_([^_\s][^_]*)_(?=$|[^\w])/g, '$1<em>$2</em>')
    // Only http(s), mailto and in-page links: a "javascript:" URL stays text.
    .replace(/\[([^\]]+)\]\(((?:https?:|mailto:|#)[^)\s]*)\)/g, '<a href="$2">$1</a>');
  // eslint-disable-next-line no-control-regex -- NUL marks the code spans set aside above
  return out.replace(/\u0000(\d+)\u0000/g, (_m, i: string) => codeSpans[Number(i)]);
}

export function markdownToHtml(markdown: string): string {
  const lines = markdown.replace(/\r\n?/g, '\n').split('\n');
  const html: string[] = [];
  let paragraph: string[] = [];
  let list: { tag: 'ul' | 'ol'; items: string[] } | null = null;
  const flushParagraph = () => {
    if (paragraph.length > 0) html.push(`<p>${inline(paragraph.join(' '))}</p>`);
    paragraph = [];
  };
  const flushList = () => {
    if (list !== null) html.push(`<${list.tag}>${list.items.map((i) => `<li>${inline(i)}</li>`).join('')}</${list.tag}>`);
    list = null;
  };
  for (const raw of lines) {
    const line = raw.trim();
    const heading = /^(#{1,6})\s+(.*)$/.exec(line);
    const bullet = /^[-*]\s+(.*)$/.exec(line);
    const numbered = /^\d+[.)]\s+(.*)$/.exec(line);
    if (line === '') {
      flushParagraph();
      flushList();
    } else if (heading) {
      flushParagraph();
      flushList();
      const level = heading[1].length;
      html.push(`<h${level}>${inline(heading[2])}</h${level}>`);
    } else if (bullet || numbered) {
      flushParagraph();
      const tag = bullet ? 'ul' : 'ol';
      if (list !== null && list.tag !== tag) flushList();
      if (list === null) list = { tag, items: [] };
      list.items.push((bullet ?? numbered)![1]);
    } else if (list !== null && /^\s+/.test(raw)) {
      // An indented line continues the last list item.
      list.items[list.items.length - 1] += ' ' + line;
    } else {
      flushList();
      paragraph.push(line);
    }
  }
  flushParagraph();
  flushList();
  return html.join('\n');
}
