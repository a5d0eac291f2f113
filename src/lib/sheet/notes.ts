/**
 * Sheet notes to HTML: Markdown by marked, math between $...$ (inline) and $$...$$ (display)
 * by KaTeX. Raw HTML in notes is shown as text and links may only be http(s), mailto or
 * relative, because notes are written by one team member and read by others.
 */
import katex from 'katex';
import { Marked, type Tokens } from 'marked';

const escapeHtml = (text: string) => text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

const SAFE_LINK = /^(https?:|mailto:|\/|#|\.)/i;

const markdown = new Marked({
  gfm: true,
  extensions: [
    {
      name: 'displayMath',
      level: 'block',
      start: (src: string) => src.indexOf('$$'),
      tokenizer(src: string) {
        const match = /^\$\$([\s\S]+?)\$\$/.exec(src);
        return match ? { type: 'displayMath', raw: match[0], text: match[1].trim() } : undefined;
      },
      renderer: (token) => katex.renderToString(String(token.text), { displayMode: true, throwOnError: false }),
    },
    {
      name: 'inlineMath',
      level: 'inline',
      start: (src: string) => src.indexOf('$'),
      tokenizer(src: string) {
        const match = /^\$([^$\n]+?)\$/.exec(src);
        return match ? { type: 'inlineMath', raw: match[0], text: match[1] } : undefined;
      },
      renderer: (token) => katex.renderToString(String(token.text), { displayMode: false, throwOnError: false }),
    },
  ],
  renderer: {
    html: (token: Tokens.HTML | Tokens.Tag) => escapeHtml(token.text),
    link({ href, title, tokens }: Tokens.Link) {
      const text = this.parser.parseInline(tokens);
      if (!SAFE_LINK.test(href)) return text;
      return `<a href="${escapeHtml(href)}"${title ? ` title="${escapeHtml(title)}"` : ''} rel="noopener noreferrer">${text}</a>`;
    },
    image: ({ text }: Tokens.Image) => escapeHtml(text),
  },
});

/** HTML of the notes (Markdown with $math$), safe to insert into the page. */
export function renderNotes(text: string): string {
  return markdown.parse(text, { async: false });
}
