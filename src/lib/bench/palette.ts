/**
 * Colours and dash patterns of the bench's charts. Lines use the Okabe–Ito colour-blind-safe
 * palette (M. Okabe, K. Ito, "Color Universal Design", 2008), each also told apart by its dash
 * pattern. The light theme uses the palette members that reach 3:1 against white (WCAG 2.1
 * non-text contrast; orange darkened to reach it); the dark theme the lighter members.
 * Neutral colours (axes, grid, text) come from the page's theme tokens.
 */

/** Neutral colours of the page theme, read from the CSS tokens of src/app.css. */
export interface ThemeTokens {
	ink: string;
	ink2: string;
	ink3: string;
	line: string;
	panel: string;
	sunken: string;
}

/** The chart palette of one theme. */
export interface ChartPalette {
	dark: boolean;
	tokens: ThemeTokens;
	pv: string;
	mv: string;
	setpoint: string;
	band: string;
	/** Comparison sets 1–4: colour and dash pattern (CSS pixels). */
	compare: { stroke: string; dash: number[] }[];
	/** Pole-map trails, current poles and zeros. */
	trail: string;
	pole: string;
	zero: string;
	marker: string;
	unstableFill: string;
}

const LIGHT_TOKENS: ThemeTokens = { ink: '#0f1c1f', ink2: '#3f5157', ink3: '#56686d', line: '#d2dbdc', panel: '#ffffff', sunken: '#eaefef' };
const DARK_TOKENS: ThemeTokens = { ink: '#e1eae9', ink2: '#a9babc', ink3: '#8fa2a5', line: '#213338', panel: '#0f1a1d', sunken: '#142327' };

/** Dash patterns: solid PV, dashed set-point, and four distinct patterns for the comparison sets. */
export const DASH = {
	solid: [] as number[],
	setpoint: [6, 4],
	compare: [
		[10, 4],
		[2, 3],
		[12, 3, 2, 3],
		[5, 5]
	]
};

/** The palette for a theme; `tokens` override the built-in neutral colours (read from the page). */
export function chartPalette(dark: boolean, tokens?: Partial<ThemeTokens>): ChartPalette {
	const t = { ...(dark ? DARK_TOKENS : LIGHT_TOKENS), ...tokens };
	if (dark) {
		return {
			dark,
			tokens: t,
			pv: '#56B4E9',
			mv: '#E69F00',
			setpoint: t.ink2,
			band: 'rgba(86, 180, 233, 0.22)',
			compare: [
				{ stroke: '#009E73', dash: DASH.compare[0] },
				{ stroke: '#CC79A7', dash: DASH.compare[1] },
				{ stroke: '#F0E442', dash: DASH.compare[2] },
				{ stroke: '#e1eae9', dash: DASH.compare[3] }
			],
			trail: 'rgba(169, 186, 188, 0.75)',
			pole: '#56B4E9',
			zero: '#E69F00',
			marker: '#F0E442',
			unstableFill: 'rgba(213, 94, 0, 0.10)'
		};
	}
	return {
		dark,
		tokens: t,
		pv: '#0072B2',
		mv: '#D55E00',
		setpoint: t.ink3,
		band: 'rgba(86, 180, 233, 0.30)',
		compare: [
			{ stroke: '#009E73', dash: DASH.compare[0] },
			{ stroke: '#CC79A7', dash: DASH.compare[1] },
			{ stroke: '#000000', dash: DASH.compare[2] },
			{ stroke: '#9A6700', dash: DASH.compare[3] }
		],
		trail: 'rgba(63, 81, 87, 0.55)',
		pole: '#0072B2',
		zero: '#D55E00',
		marker: '#9A6700',
		unstableFill: 'rgba(213, 94, 0, 0.07)'
	};
}

/** Relative luminance of an sRGB colour #rrggbb (WCAG 2.1 definition). */
export function relativeLuminance(hex: string): number {
	const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex.trim());
	if (!m) throw new Error(`Not a #rrggbb colour: ${hex}`);
	const lin = (c: number) => {
		const s = c / 255;
		return s <= 0.03928 ? s / 12.92 : Math.pow((s + 0.055) / 1.055, 2.4);
	};
	const [r, g, b] = [m[1], m[2], m[3]].map((h) => lin(parseInt(h, 16)));
	return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** WCAG 2.1 contrast ratio (L1 + 0.05)/(L2 + 0.05) of two #rrggbb colours. */
export function contrastRatio(a: string, b: string): number {
	const la = relativeLuminance(a);
	const lb = relativeLuminance(b);
	return (Math.max(la, lb) + 0.05) / (Math.min(la, lb) + 0.05);
}
