/**
 * Remarks to HTML: Markdown (remark) with $math$ and $$math$$ (KaTeX). Remarks are written by one
 * team member and read by others, so raw HTML is dropped and the tree is sanitised with
 * rehype-sanitize's GitHub-like schema (no scripts, event handlers or javascript: links) before
 * KaTeX, whose own output is trusted (its `trust` option stays off, so \href cannot smuggle links).
 */
import rehypeKatex from 'rehype-katex';
import rehypeSanitize, { defaultSchema, type Options as SanitizeSchema } from 'rehype-sanitize';
import rehypeStringify from 'rehype-stringify';
import remarkMath from 'remark-math';
import remarkParse from 'remark-parse';
import remarkRehype from 'remark-rehype';
import { unified } from 'unified';

/** The default schema, letting remark-math's code classes through so KaTeX can find the math. */
const REMARK_SCHEMA: SanitizeSchema = {
  ...defaultSchema,
  attributes: {
    ...defaultSchema.attributes,
    code: [['className', /^language-./, 'math-inline', 'math-display']],
  },
};

const processor = unified()
  .use(remarkParse)
  .use(remarkMath)
  .use(remarkRehype)
  .use(rehypeSanitize, REMARK_SCHEMA)
  .use(rehypeKatex)
  .use(rehypeStringify);

/** HTML of one remark (Markdown with math), safe to insert into the page. */
export function renderRemark(markdown: string): string {
  return String(processor.processSync(markdown));
}
