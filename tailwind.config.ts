import typography from '@tailwindcss/typography';
import type { Config } from 'tailwindcss';

/** A theme colour read from the tokens in src/app.css (they switch with the light/dark theme). */
const token = (name: string) => `var(--ll-${name})`;

export default {
	content: ['./src/**/*.{html,js,svelte,ts,svx,md}', './content/**/*.{md,svx}'],
	// The `dark:` variant is declared in src/app.css (@custom-variant): an explicit dark choice or
	// the system preference when the person left it to the system.
	theme: {
		extend: {
			fontFamily: {
				sans: ['"Inter Variable"', 'system-ui', 'sans-serif'],
				mono: ['"IBM Plex Mono"', 'ui-monospace', 'monospace']
			},
			colors: {
				canvas: token('canvas'),
				panel: token('panel'),
				sunken: token('sunken'),
				hover: token('hover'),
				ink: { DEFAULT: token('ink'), 2: token('ink-2'), 3: token('ink-3') },
				line: { DEFAULT: token('line'), strong: token('line-strong') },
				brand: { DEFAULT: token('brand'), strong: token('brand-strong'), soft: token('brand-soft'), on: token('on-brand') },
				accent: { DEFAULT: token('accent'), fill: token('accent-fill'), on: token('on-accent') },
				warn: { soft: token('warn-soft'), ink: token('warn-ink'), line: token('warn-line') },
				danger: { DEFAULT: token('danger'), soft: token('danger-soft') },
				ok: { DEFAULT: token('ok'), soft: token('ok-soft') },
				info: { soft: token('info-soft'), ink: token('info-ink') }
			},
			fontSize: {
				'2xs': ['0.6875rem', { lineHeight: '1rem' }]
			}
		}
	},
	plugins: [typography]
} satisfies Config;
