import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { buildSearchIndex, searchableText, searchDocument, sourceFromEntry, type SearchSource } from '../../../src/lib/docs/search-index';
import { loadSearchIndex, searchPages } from '../../../src/lib/docs/search';

const docsDir = new URL('../../../content/docs/', import.meta.url);

/** The reference pages as the docs collection holds them: front matter read as data, the rest as body. */
const reference: SearchSource[] = readdirSync(docsDir)
  .filter((name) => name.endsWith('.md'))
  .map((name) => {
    const [, front, body] = /^---\n([\s\S]*?)\n---\n([\s\S]*)$/.exec(readFileSync(new URL(name, docsDir), 'utf8'))!;
    const data = Object.fromEntries(front.split('\n').map((line) => [line.slice(0, line.indexOf(':')), line.slice(line.indexOf(':') + 1).trim().replace(/^"|"$/g, '')]));
    return sourceFromEntry('reference', { id: name.replace(/\.md$/, ''), body, data });
  });

/** The index as the browser receives it: serialised by the build, parsed from JSON, loaded back. */
const served = (sources: readonly SearchSource[]) => loadSearchIndex(JSON.parse(buildSearchIndex(sources)));

describe('searchableText', () => {
  it('keeps the words of headings, paragraphs, code and math and drops Markdown syntax', () => {
    const { headings, text } = searchableText('# Page\n\n## Roll *axis*\n\nThe **pivot** turns `steer`.\n\n$$\\omega$$\n');
    expect(headings).toEqual(['Roll axis']);
    expect(text).toContain('The pivot turns steer.');
    expect(text).not.toContain('**');
  });

  it('drops MDX import and export lines and raw markup', () => {
    const { text } = searchableText("import Calculator from '../components/Calculator';\nexport const x = 1;\n\n<Calculator sheet=\"a\" />\n\nRollers roll.\n");
    expect(text).toBe('Rollers roll.');
  });
});

describe('the search over the reference pages', () => {
  const index = served(reference);

  it('indexes every reference page in content/docs, each under /docs', () => {
    expect(reference).toHaveLength(readdirSync(docsDir).filter((name) => name.endsWith('.md')).length);
    expect(reference.length).toBeGreaterThanOrEqual(9);
    expect(reference.map((page) => searchDocument(page).href).every((href) => /^\/docs\/[a-z-]+$/.test(href))).toBe(true);
  });

  // A word that appears in one page's running text only (grep content/docs): the page is the hit.
  it('finds the log page by a word from its body only (gzip), first before fuzzy near-misses', () => {
    const hits = searchPages(index, 'gzip');
    expect(hits[0]).toMatchObject({ href: '/docs/log-mapping', kind: 'reference' });
  });

  it('ranks the page named by the query first (a title match outranks body text)', () => {
    expect(searchPages(index, 'warning codes')[0]?.href).toBe('/docs/warnings');
    expect(searchPages(index, 'URDF')[0]?.href).toBe('/docs/urdf-import');
  });

  it('matches a word being typed (prefix) and a slip of the keyboard (fuzzy)', () => {
    expect(searchPages(index, 'Ferrari-Can')[0]?.href).toBe('/docs/grasp-quality');
    expect(searchPages(index, 'curvatrue').map((hit) => hit.href)).toContain('/docs/curvature');
  });

  it('returns stored title and summary for a hit, nothing for a blank query or an unknown word', () => {
    const [hit] = searchPages(index, 'Ferrari');
    expect(hit).toMatchObject({ id: 'reference/grasp-quality', title: 'Grasp quality under friction' });
    expect(hit.summary.length).toBeGreaterThan(0);
    expect(searchPages(index, '   ')).toEqual([]);
    expect(searchPages(index, 'zzqxv')).toEqual([]);
  });

  it('limits the number of hits', () => {
    expect(searchPages(index, 'the', 3)).toHaveLength(3);
  });
});

describe('examples in the same index', () => {
  it('lists a worked example under /examples beside the reference, read from whatever schema its collection has', () => {
    const example = sourceFromEntry('example', { id: 'steering-near-the-pole', body: 'A contact near the pole of the roller needs a steered pivot.', data: { title: 'Steering near the pole', description: 'Why steering helps.' } });
    const hits = searchPages(served([...reference, example]), 'pole steered');
    expect(hits[0]).toMatchObject({ kind: 'example', href: '/examples/steering-near-the-pole', summary: 'Why steering helps.' });
  });
});
