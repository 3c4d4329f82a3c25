import { describe, expect, it } from 'vitest';
import { escapeHtml, jsonForScript } from '../../kernel-lib/display/escape-html';

describe('escapeHtml', () => {
  it('escapes the five characters special in content and quoted attributes', () => {
    // HTML Living Standard, §13.1.2.6 and §13.5 (serialising text and attribute values); the
    // apostrophe as the numeric reference &#39; (common practice, no source)
    expect(escapeHtml(`<a href="x">Tom's & Jerry's</a>`)).toBe('&lt;a href=&quot;x&quot;&gt;Tom&#39;s &amp; Jerry&#39;s&lt;/a&gt;');
  });

  it('escapes an ampersand once, so already-escaped text shows literally', () => {
    expect(escapeHtml('&amp;')).toBe('&amp;amp;');
    expect(escapeHtml('plain text, ünïcode, 3 ≤ 4')).toBe('plain text, ünïcode, 3 ≤ 4');
    expect(escapeHtml('')).toBe('');
  });
});

describe('jsonForScript', () => {
  it('cannot end a script element early and still parses to the same value', () => {
    // "</script>" inside script data ends the element (HTML Living Standard, §4.12.1.3
    // restrictions for contents of script elements): < > & become \u escapes, which JSON.parse reads back.
    const value = { note: '</script><script>alert(1)</script>', amp: 'a & b', sep: 'x\u2028y\u2029z', n: [1, 2.5] };
    const text = jsonForScript(value);
    expect(text).not.toMatch(/[<>&\u2028\u2029]/);
    expect(JSON.parse(text)).toEqual(value);
    // U+2028/2029 were line terminators in JavaScript string literals before ES2019 (ECMA-262 10th ed., §11.8.4)
    expect(text).toContain('\\u2028');
    expect(text).toContain('\\u2029');
  });
});
