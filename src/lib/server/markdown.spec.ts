import { describe, expect, it } from 'vitest';
import { renderNoteMarkdown } from './markdown';

describe('renderNoteMarkdown', () => {
	it('renders Markdown structure', () => {
		const html = renderNoteMarkdown('# Bump test\n\nStep of **5 %** on the *steam valve*.\n\n- one\n- two\n');
		expect(html).toContain('<h1>Bump test</h1>');
		expect(html).toContain('<strong>5 %</strong>');
		expect(html).toContain('<em>steam valve</em>');
		expect(html).toMatch(/<ul>\s*<li>one<\/li>/);
	});

	it('renders inline and display math with KaTeX, keeping its classes, sizes and MathML', () => {
		const html = renderNoteMarkdown('Gain $K = \\frac{\\Delta y}{\\Delta u}$ here.\n\n$$\n\\sqrt{x^2}\n$$\n');
		expect(html).toContain('class="katex"');
		expect(html).toContain('<math xmlns="http://www.w3.org/1998/Math/MathML"');
		expect(html).toContain('<mfrac>');
		expect(html).toContain('katex-display');
		expect(html).toMatch(/style="height:[0-9.]+em;vertical-align:-?[0-9.]+em;?"/);
		expect(html).toContain('aria-hidden="true"');
		expect(html).toContain('<svg'); // the radical sign
		expect(html).toContain('<path d="M');
	});

	it('renders inline math at the start of a wrapped line', () => {
		const html = renderNoteMarkdown('The zero at\n$s = +1/8\\ \\mathrm{s^{-1}}$ limits the loop.\n\nCosts $5 and $6 stay text.');
		expect(html).toContain('class="katex"');
		expect(html).not.toContain('$s = ');
		expect(html).toContain('Costs $5 and $6 stay text.');
	});

	it('shows malformed math as text instead of throwing', () => {
		const html = renderNoteMarkdown('Broken $\\frac{1}{$ math');
		expect(html).toContain('katex-error');
	});

	it('removes scripts, event handlers and dangerous links', () => {
		const html = renderNoteMarkdown(
			[
				'<script>alert(1)</script>',
				'<img src="x" onerror="alert(2)">',
				'[click](javascript:alert(3))',
				'<a href="data:text/html,hi">data</a>',
				'<iframe src="https://example.org"></iframe>',
				'<span style="background:url(https://example.org/x)">bg</span>',
				'<div onclick="alert(4)">div</div>',
				'<form action="/x"><input name="a"></form>'
			].join('\n\n')
		);
		expect(html).not.toMatch(/<script/i);
		expect(html).not.toMatch(/onerror|onclick/i);
		expect(html).not.toMatch(/javascript:/i);
		expect(html).not.toMatch(/data:text/i);
		expect(html).not.toMatch(/<iframe|<form|<input/i);
		expect(html).not.toMatch(/background/i);
	});

	it('keeps safe links and marks them nofollow', () => {
		const html = renderNoteMarkdown('[datasheet](https://example.org/ds.pdf) and [model](/models/3)');
		expect(html).toContain('href="https://example.org/ds.pdf"');
		expect(html).toContain('href="/models/3"');
		expect(html).toContain('rel="noopener noreferrer nofollow"');
	});

	it('does not let math smuggle markup', () => {
		const html = renderNoteMarkdown('$\\text{<img src=x onerror=alert(1)>}$');
		expect(html).not.toMatch(/<img/i);
		expect(html).toContain('&lt;img src=x onerror=alert(1)&gt;'); // shown as text, escaped
	});
});
