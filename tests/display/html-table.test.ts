import { afterEach, describe, expect, it, vi } from 'vitest';
import * as aq from 'arquero';
import { formatCell, htmlTable, showTable, textTable } from '../../kernel-lib/display/index';

/** Cell texts of the body rows, entities decoded back (HTML Living Standard named references). */
function bodyCells(html: string): string[][] {
  const body = /<tbody>([\s\S]*)<\/tbody>/.exec(html)![1];
  const decode = (s: string) =>
    s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');
  return [...body.matchAll(/<tr>([\s\S]*?)<\/tr>/g)].map((r) => [...r[1].matchAll(/<td[^>]*>([\s\S]*?)<\/td>/g)].map((c) => decode(c[1])));
}

function headers(html: string): string[] {
  return [...html.matchAll(/<th\b[^>]*>([\s\S]*?)<\/th>/g)].map((m) => m[1]);
}

describe('htmlTable', () => {
  it('escapes markup in values, headers and caption (HTML Living Standard: < & " are escaped in text)', () => {
    const html = htmlTable([{ 'site <a>': '<script>alert("x")</script> & co' }], { caption: 'Sites & <plots>' });
    expect(html).not.toContain('<script>');
    expect(html).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; co');
    expect(html).toContain('<th style="text-align:left">site &lt;a&gt;</th>');
    expect(html).toContain('<caption>Sites &amp; &lt;plots&gt;</caption>');
    expect(bodyCells(html)).toEqual([['<script>alert("x")</script> & co']]);
  });

  it('rounds to significant digits, keeps integers whole and marks missing values', () => {
    const rows = [
      { x: 1.23456789, n: 120, big: 123456.7, small: 0.0000123456, note: null },
      { x: -0.0098767, n: 7, big: 2.5e7, small: NaN, note: 'ok' },
    ];
    // Hand-rounded to 4 significant digits (common practice, no source).
    expect(bodyCells(htmlTable(rows))).toEqual([
      ['1.235', '120', '123457', '1.235e-5', 'NA'],
      ['-0.009877', '7', '25000000', 'NA', 'ok'],
    ]);
    expect(bodyCells(htmlTable(rows, { digits: 2, columns: ['x'] }))).toEqual([['1.2'], ['-0.0099']]);
  });

  it('right-aligns numeric columns only', () => {
    const html = htmlTable([{ name: 'a', v: 1.5 }, { name: 'b', v: null }]);
    expect(html).toContain('<th style="text-align:left">name</th><th style="text-align:right">v</th>');
  });

  it('shows metric rows as "value (mcse)": MCSE to one significant digit, value to the same place', () => {
    const rows = [
      { metric: 'coverage', value: 0.9432, mcse: 0.0071, n: 1000 },
      { metric: 'power', value: 0.61234, mcse: 0.0154, n: 1000 },
      { metric: 'bias', value: 1234.5, mcse: 23, n: 1000 },
      { metric: 'rmse', value: 0.5, mcse: NaN, n: 3 },
    ];
    const html = htmlTable(rows);
    expect(headers(html)).toEqual(['metric', 'value (MCSE)', 'n']);
    // Rule of formatMetric, worked by hand (common practice, no source): 0.0071 -> 0.007 so the
    // value keeps 3 decimals; 0.0154 -> 0.02 (2 decimals); 23 -> 20 (tens); NaN MCSE -> "(NA)".
    expect(bodyCells(html).map((r) => r[1])).toEqual(['0.943 (0.007)', '0.61 (0.02)', '1230 (20)', '0.5000 (NA)']);
    // With mcse: false both columns are shown on their own.
    expect(headers(htmlTable(rows, { mcse: false }))).toEqual(['metric', 'value', 'mcse', 'n']);
  });

  it('accepts an arquero table and a column subset in the given order', () => {
    const dt = aq.table({ site: ['North', 'Ditch'], height: [12.345, 9.87654] });
    const html = htmlTable(dt, { columns: ['height', 'site'] });
    expect(headers(html)).toEqual(['height', 'site']);
    expect(bodyCells(html)).toEqual([['12.35', 'North'], ['9.877', 'Ditch']]);
  });

  it('limits long tables and says how many rows are hidden', () => {
    const rows = Array.from({ length: 12 }, (_, i) => ({ i }));
    const html = htmlTable(rows, { maxRows: 10 });
    expect(bodyCells(html)).toHaveLength(10);
    expect(html).toContain('… 2 more rows not shown');
  });

  it('names the column or option on bad input', () => {
    expect(() => htmlTable([{ a: 1 }], { columns: ['b'] })).toThrow(/no column "b"; columns are a/);
    expect(() => htmlTable([{ value: 1 }], { mcse: true })).toThrow(/"mcse": needs columns "value" and "mcse", missing mcse/);
    expect(() => htmlTable([{ a: 1 }], { digits: 0 })).toThrow(/"digits": expected an integer from 1 to 15, got 0/);
    expect(() => htmlTable([{ a: 1 }, 5] as unknown as object[])).toThrow(/data row 2: expected an object/);
  });
});

describe('textTable and showTable outside a notebook', () => {
  afterEach(() => vi.restoreAllMocks());

  it('prints a plain-text table with the same formatted cells', () => {
    const log = vi.spyOn(console, 'log').mockImplementation(() => undefined);
    const rows = [{ metric: 'coverage', value: 0.9432, mcse: 0.0071 }];
    showTable(rows, { caption: 'Metrics' });
    expect(log).toHaveBeenCalledTimes(1);
    const text = String(log.mock.calls[0][0]);
    expect(text).toBe(textTable(rows, { caption: 'Metrics' }));
    expect(text.split('\n')[0]).toBe('Metrics');
    expect(text).toContain('0.943 (0.007)');
  });

  it('formats single cells', () => {
    expect(formatCell(undefined, 4)).toBe('NA');
    expect(formatCell(true, 4)).toBe('true');
    expect(formatCell(new Date(Date.UTC(2024, 5, 1)), 4)).toBe('2024-06-01T00:00:00.000Z');
    expect(formatCell({ a: 1 }, 4)).toBe('{"a":1}');
  });
});
