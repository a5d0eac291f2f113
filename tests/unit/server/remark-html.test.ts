import { describe, expect, it } from 'vitest';
import { renderRemark } from '../../../src/lib/server/remark-html';

describe('remarks rendered as HTML', () => {
  it('drops a script tag, leaving at most inert text', () => {
    const html = renderRemark('Looks fine <script>alert(document.cookie)</script> to me.');
    expect(html).not.toMatch(/<script/i);
    expect(html).toBe('<p>Looks fine alert(document.cookie) to me.</p>');
  });

  it('neutralises javascript: links in Markdown and in raw HTML', () => {
    const html = renderRemark('[the derivation](javascript:alert(1)) and <a href="javascript:alert(2)">this</a> and <img src=x onerror="alert(3)">');
    expect(html).not.toMatch(/javascript:/i);
    expect(html).not.toMatch(/onerror/i);
    expect(html).toContain('the derivation');
  });

  it('keeps ordinary links and emphasis', () => {
    expect(renderRemark('See [the catalogue](https://example.com/catalogue), **really**.')).toBe(
      '<p>See <a href="https://example.com/catalogue">the catalogue</a>, <strong>really</strong>.</p>',
    );
  });

  it('typesets inline and display math with KaTeX', () => {
    const html = renderRemark('Slip is $v_s = \\omega r$ here:\n\n$$\n\\dot\\theta = \\frac{v}{r}\n$$');
    // KaTeX marks inline math with class "katex" and display math with "katex-display" (KaTeX documentation).
    expect(html).toContain('class="katex"');
    expect(html).toContain('katex-display');
    expect(html).not.toContain('$v_s');
  });

  it('does not let KaTeX \\href carry a javascript: link', () => {
    // The source stays visible as text in KaTeX's annotation; what matters is that no link is made.
    expect(renderRemark('$\\href{javascript:alert(1)}{x}$')).not.toMatch(/href="javascript:/i);
  });
});
