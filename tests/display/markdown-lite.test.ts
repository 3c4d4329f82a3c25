import { describe, expect, it } from 'vitest';
import { markdownToHtml } from '../../kernel-lib/display/markdown-lite';

describe('markdownToHtml', () => {
  // CommonMark 0.31 spec examples (headings, emphasis, lists, code spans), restricted to the subset.
  it('renders headings, emphasis, code spans, lists and links', () => {
    expect(markdownToHtml('## Design')).toBe('<h2>Design</h2>');
    expect(markdownToHtml('*a* and _b_ and **c** and `d*e*`')).toBe('<p><em>a</em> and <em>b</em> and <strong>c</strong> and <code>d*e*</code></p>');
    expect(markdownToHtml('1. one\n2. two')).toBe('<ol><li>one</li><li>two</li></ol>');
    expect(markdownToHtml('[site](https://example.org/a)')).toBe('<p><a href="https://example.org/a">site</a></p>');
    expect(markdownToHtml('line one\nline two\n\nnext')).toBe('<p>line one line two</p>\n<p>next</p>');
  });

  it('shows raw HTML and script links as text', () => {
    expect(markdownToHtml('<b>x</b>')).toBe('<p>&lt;b&gt;x&lt;/b&gt;</p>');
    expect(markdownToHtml('[x](javascript:alert(1))')).toBe('<p>[x](javascript:alert(1))</p>');
    expect(markdownToHtml('snake_case_name')).toBe('<p>snake_case_name</p>');
  });

  it('keeps heading levels 1 to 6; seven # signs are a paragraph (CommonMark 0.31, §4.2 ATX headings)', () => {
    expect(markdownToHtml('# a\n###### f')).toBe('<h1>a</h1>\n<h6>f</h6>');
    expect(markdownToHtml('####### g')).toBe('<p>####### g</p>');
    expect(markdownToHtml('#no-space')).toBe('<p>#no-space</p>');
  });

  it('bullet lists with - or *, continuation lines, and a switch of list type', () => {
    // A list item's indented next line belongs to the item (CommonMark 0.31, §5.2 list items);
    // a change of bullet type to ordered starts a new list (§5.3).
    expect(markdownToHtml('- one\n- two\n  more')).toBe('<ul><li>one</li><li>two more</li></ul>');
    expect(markdownToHtml('* star')).toBe('<ul><li>star</li></ul>');
    expect(markdownToHtml('- a\n1) b')).toBe('<ul><li>a</li></ul>\n<ol><li>b</li></ol>');
    // this subset's own rule (the module's comment): an unindented line ends the list, where
    // CommonMark would continue the item lazily
    expect(markdownToHtml('- a\nafter')).toBe('<ul><li>a</li></ul>\n<p>after</p>');
  });

  it('treats Windows line ends like Unix ones and escapes text inside code spans', () => {
    expect(markdownToHtml('one\r\ntwo\r\n\r\nthree')).toBe('<p>one two</p>\n<p>three</p>');
    // code span content is literal, HTML-escaped (CommonMark 0.31, §6.1 code spans)
    expect(markdownToHtml('`<a>` & **b**')).toBe('<p><code>&lt;a&gt;</code> &amp; <strong>b</strong></p>');
    expect(markdownToHtml('')).toBe('');
  });
});
