import { describe, expect, it } from 'vitest';
import { htmlTable, reportHtml, specToSvg, STANDING_CAUTION } from '../../kernel-lib/display/index';

const CAUTION =
  'Results hold only under the simulated assumptions; defer to a qualified statistician and local survey protocols.';

async function sampleReport(): Promise<string> {
  const chartSvg = await specToSvg({
    data: { values: [{ site: 'North', n: 3 }, { site: 'Ditch', n: 5 }] },
    mark: 'bar',
    encoding: { x: { field: 'site', type: 'nominal' }, y: { field: 'n', type: 'quantitative' } },
  });
  return reportHtml({
    title: 'Larkspur Fen design <draft>',
    sections: [
      { heading: 'Summary', markdown: 'Invented numbers. Coverage is **close** to nominal.\n\n- sites: 12\n- quadrats: 6' },
      { heading: 'Metrics', html: htmlTable([{ metric: 'coverage', value: 0.9432, mcse: 0.0071 }]) },
      { heading: 'Chart', chartSvg },
    ],
    cautions: ['Only 200 replicates per scenario.'],
  });
}

describe('reportHtml', () => {
  it('ends with the cautions block holding the extra cautions and the standing caution last', async () => {
    const html = await sampleReport();
    expect(STANDING_CAUTION).toBe(CAUTION);
    const cautions = html.indexOf('<section class="cautions">');
    expect(cautions).toBeGreaterThan(html.lastIndexOf('<h2>Chart</h2>'));
    expect(html.slice(cautions)).toContain(`<li>Only 200 replicates per scenario.</li><li>${CAUTION}</li></ul>`);
    // Nothing but the closing tags after the cautions section.
    expect(html.slice(html.indexOf('</section>', cautions))).toBe('</section>\n</body>\n</html>\n');
  });

  it('is self-contained: no scripts, no external stylesheets, chart SVG inline', async () => {
    const html = await sampleReport();
    expect(html).not.toMatch(/<script\b/i);
    expect(html).not.toMatch(/<script src=/i);
    expect(html).not.toMatch(/<link href="http/i);
    expect(html).not.toMatch(/<link\b/i);
    expect(html).not.toMatch(/\b(src|href)="(https?:)?\/\//i);
    expect(html).toMatch(/<style>[\s\S]*<\/style>/);
    expect(html).toMatch(/<figure class="chart"><svg [^>]*class="marks"/);
    expect(html.match(/aria-roledescription="bar"/g)).toHaveLength(2);
    expect(html).toContain('0.943 (0.007)');
  });

  it('escapes the title and renders the Markdown subset', async () => {
    const html = await sampleReport();
    expect(html).toContain('<title>Larkspur Fen design &lt;draft&gt;</title>');
    expect(html).toContain('<p>Invented numbers. Coverage is <strong>close</strong> to nominal.</p>');
    expect(html).toContain('<ul><li>sites: 12</li><li>quadrats: 6</li></ul>');
  });

  it('refuses section HTML or SVG that would load something from elsewhere, naming the section', () => {
    const section = (html: string) => reportHtml({ title: 'T', sections: [{ heading: 'Ok', markdown: 'x' }, { heading: 'Bad', html }] });
    expect(() => section('<script src="https://cdn.example/x.js"></script>')).toThrow(/section 2 \("Bad"\) html: contains "<script src="/);
    expect(() => section('<link rel="stylesheet" href="http://example.org/a.css">')).toThrow(/section 2/);
    expect(() => section('<img src="//example.org/a.png">')).toThrow(/self-contained/);
    expect(() => section('<script>alert(1)</script>')).toThrow(/no scripts/);
    expect(() => reportHtml({ title: 'T', sections: [{ heading: 'S', chartSvg: '<div>no svg</div>' }] })).toThrow(
      /section 1 \("S"\) chartSvg: expected an SVG document/,
    );
    expect(() => reportHtml({ title: ' ', sections: [] })).toThrow(/title: expected a non-empty string/);
  });

  it('still ends with the standing caution when there are no sections or extra cautions', () => {
    const html = reportHtml({ title: 'Empty', sections: [] });
    expect(html).toContain(`<ul><li>${CAUTION}</li></ul>`);
  });
});
