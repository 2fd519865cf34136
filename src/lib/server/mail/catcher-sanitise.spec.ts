import { describe, expect, it } from 'vitest';
import { sanitiseMailHtml } from './catcher';

describe('sanitiseMailHtml', () => {
	it('keeps body text, tables and safe links; drops the head, scripts, styles, images and handlers', () => {
		const html =
			'<html><head><title>Models to revalidate</title><style>p{color:red}</style></head><body>' +
			'<h1 onclick="x()">Models to revalidate</h1><table><tr><td><a href="https://ok.test/">TIC-2201</a></td></tr></table>' +
			'<img src="https://tracker.test/p.gif"><script>alert(1)</script><a href="javascript:alert(1)">bad</a></body></html>';
		const out = sanitiseMailHtml(html);
		expect(out.match(/Models to revalidate/g)).toHaveLength(1);
		expect(out).toContain('<h1>Models to revalidate</h1>');
		expect(out).toContain('<a href="https://ok.test/" rel="noopener noreferrer nofollow" target="_blank">TIC-2201</a>');
		expect(out).not.toMatch(/script|img|style|onclick|javascript|color:red/);
	});
});
