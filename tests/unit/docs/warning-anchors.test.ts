import { readFileSync } from 'node:fs';
import { rehypeHeadingIds } from '@astrojs/markdown-remark';
import rehypeStringify from 'rehype-stringify';
import remarkMath from 'remark-math';
import remarkParse from 'remark-parse';
import remarkRehype from 'remark-rehype';
import { unified } from 'unified';
import { describe, expect, it } from 'vitest';
import { warningHelpHref } from '../../../src/lib/docs/reference';
import { WARNING_CODES } from '../../../src/lib/kinematics/index';

const source = readFileSync(new URL('../../../content/docs/warnings.md', import.meta.url), 'utf8').replace(/^---\n[\s\S]*?\n---\n/, '');

/** The heading ids of warnings.md as the site gives them: Astro's own heading-id plugin over the Markdown. */
async function headingIds(): Promise<Set<string>> {
  const html = String(await unified().use(remarkParse).use(remarkMath).use(remarkRehype).use(rehypeHeadingIds).use(rehypeStringify).process(source));
  return new Set([...html.matchAll(/<h[1-6] id="([^"]+)"/g)].map((match) => match[1]));
}

describe('every warning note links to its explanation', () => {
  it('warnings.md has a heading whose anchor is the one each code links to', async () => {
    const ids = await headingIds();
    const missing = WARNING_CODES.filter((code) => !ids.has(warningHelpHref(code).split('#')[1]));
    expect(missing).toEqual([]);
  });

  it('links into the warnings page, one anchor per code', () => {
    const hrefs = WARNING_CODES.map(warningHelpHref);
    expect(hrefs.every((href) => href.startsWith('/docs/warnings#'))).toBe(true);
    expect(new Set(hrefs).size).toBe(WARNING_CODES.length);
  });

  it('finds a missing section: a code without a heading has no anchor', async () => {
    const ids = await headingIds();
    expect(ids.has(warningHelpHref('NOT_A_WARNING_CODE').split('#')[1])).toBe(false);
  });
});
