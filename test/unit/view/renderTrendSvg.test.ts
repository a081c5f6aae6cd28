import assert from 'node:assert/strict';
import { renderTrendSvg, SVG_OWNER_MARK } from '../../../extension/core/view/renderTrendSvg';

/** sax (a general-purpose XML parser, present through the packaging tool's dependencies) has no bundled types. */
interface SaxParser {
  onopentag: (node: { name: string; attributes: Record<string, string> }) => void;
  write(text: string): { close(): void };
}
// eslint-disable-next-line @typescript-eslint/no-require-imports
const sax = require('sax') as { parser(strict: boolean, options: object): SaxParser };

/** Parses with sax in strict mode (XML 1.0 well-formedness) and returns element names and attributes. */
function parseXml(text: string): { name: string; attributes: Record<string, string> }[] {
  const parser = sax.parser(true, {});
  const elements: { name: string; attributes: Record<string, string> }[] = [];
  parser.onopentag = (node) => elements.push({ name: node.name, attributes: node.attributes });
  parser.write(text).close();
  return elements;
}

describe('renderTrendSvg', () => {
  const input = {
    title: 'cpu_utilization_percent service=<basket-api> & "co"',
    timesMs: [0, 60_000, 120_000, 180_000, 240_000],
    valuesY: [20, 22, null, 90, 95],
    baseline: { startMs: 0, endMs: 60_000 },
    incident: { startMs: 180_000, endMs: 240_000 },
  };

  it('is well-formed XML with the SVG namespace and no scripts or external references (SVG 1.1 / XML 1.0)', () => {
    const svg = renderTrendSvg(input);
    const elements = parseXml(svg);
    assert.equal(elements[0].name, 'svg');
    assert.equal(elements[0].attributes.xmlns, 'http://www.w3.org/2000/svg');
    assert.ok(!elements.some((e) => e.name === 'script' || e.name === 'image' || e.name === 'use' || e.name === 'foreignObject'));
    assert.ok(!elements.some((e) => Object.keys(e.attributes).some((k) => k.startsWith('on') || k.includes('href'))));
    assert.ok(svg.includes(SVG_OWNER_MARK));
  });

  it('breaks the line at a gap and shades both windows', () => {
    const elements = parseXml(renderTrendSvg(input));
    const paths = elements.filter((e) => e.name === 'path');
    assert.equal(paths.length, 2, 'two segments around the null');
    assert.match(paths[0].attributes.d, /^M[\d.]+,[\d.]+ L[\d.]+,[\d.]+$/);
    assert.equal(elements.filter((e) => e.name === 'rect').length, 3, 'background + baseline + incident');
  });

  it('draws an empty series as an axis-only chart', () => {
    const elements = parseXml(renderTrendSvg({ ...input, timesMs: [], valuesY: [] }));
    assert.equal(elements.filter((e) => e.name === 'path').length, 0);
  });
});
