import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { parseTheme, safeReturnPath, themeClass } from './theme';

/**
 * Colour contrast of the theme tokens in src/app.css, by the WCAG 2.1 definitions of relative
 * luminance and contrast ratio (W3C, Web Content Accessibility Guidelines 2.1, 2018, "contrast
 * ratio" and "relative luminance" in the glossary); AA asks 4.5:1 for body text (SC 1.4.3) and
 * 3:1 for large text and user-interface components (SC 1.4.3, 1.4.11).
 */
function luminance(hex: string): number {
	const h = hex.replace('#', '');
	const full = h.length === 3 ? [...h].map((c) => c + c).join('') : h;
	const [r, g, b] = [0, 2, 4].map((i) => parseInt(full.slice(i, i + 2), 16) / 255);
	const lin = (c: number) => (c <= 0.03928 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
	return 0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b);
}
function contrast(a: string, b: string): number {
	const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
	return (hi + 0.05) / (lo + 0.05);
}

const css = readFileSync(new URL('../app.css', import.meta.url), 'utf8');
function tokens(selector: string): Record<string, string> {
	const start = css.indexOf(`${selector} {`);
	expect(start, `${selector} block in app.css`).toBeGreaterThanOrEqual(0);
	const body = css.slice(start, css.indexOf('}', start));
	return Object.fromEntries([...body.matchAll(/--ll-([a-z0-9-]+):\s*(#[0-9a-fA-F]{3,6})/g)].map((m) => [m[1], m[2]]));
}

describe('contrast formula', () => {
	it('gives the WCAG extremes and a known grey', () => {
		expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 10); // by definition: (1 + 0.05) / (0 + 0.05)
		expect(contrast('#ffffff', '#ffffff')).toBeCloseTo(1, 10);
		// #767676 on white is the lightest grey usually quoted as passing AA, about 4.54:1 (from memory).
		expect(contrast('#767676', '#ffffff')).toBeCloseTo(4.54, 2);
	});
});

describe.each([
	['light', '.theme-root'],
	['dark', '.theme-root.dark']
])('%s theme tokens meet WCAG AA', (_name, selector) => {
	const t = tokens(selector);
	const text = ['ink', 'ink-2', 'ink-3', 'brand', 'accent', 'danger', 'ok'];
	const surfaces = ['canvas', 'panel', 'sunken'];
	it.each(text.flatMap((fg) => surfaces.map((bg) => [fg, bg] as const)))('%s on %s ≥ 4.5:1', (fg, bg) => {
		expect(contrast(t[fg], t[bg])).toBeGreaterThanOrEqual(4.5);
	});
	it.each([
		['warn-ink', 'warn-soft'],
		['danger', 'danger-soft'],
		['ok', 'ok-soft'],
		['info-ink', 'info-soft'],
		['brand-strong', 'brand-soft'],
		['on-brand', 'brand'],
		['on-accent', 'accent-fill'],
		['ink-2', 'hover']
	])('%s on %s ≥ 4.5:1', (fg, bg) => {
		expect(contrast(t[fg], t[bg])).toBeGreaterThanOrEqual(4.5);
	});
	it('focus ring ≥ 3:1 against the surfaces (SC 1.4.11)', () => {
		for (const bg of surfaces) expect(contrast(t.focus, t[bg])).toBeGreaterThanOrEqual(3);
	});
});

it('the system-preference dark block repeats the dark tokens exactly', () => {
	const dark = tokens('.theme-root.dark');
	expect(Object.keys(dark).length).toBeGreaterThan(20);
	expect(tokens('.theme-root.theme-system')).toEqual(dark);
});

describe('theme choice', () => {
	it('reads the cookie value, defaulting to the system setting', () => {
		expect(parseTheme('dark')).toBe('dark');
		expect(parseTheme('light')).toBe('light');
		expect(parseTheme('purple')).toBe('system');
		expect(parseTheme(undefined)).toBe('system');
		expect(themeClass('dark')).toContain('dark');
		expect(themeClass('system')).toBe('theme-system');
	});
	it('only goes back to same-site paths', () => {
		expect(safeReturnPath('/register?site=2')).toBe('/register?site=2');
		expect(safeReturnPath('https://example.org/')).toBe('/');
		expect(safeReturnPath('//example.org/x')).toBe('/');
		expect(safeReturnPath('/\\example.org')).toBe('/');
		expect(safeReturnPath(undefined)).toBe('/');
	});
});
