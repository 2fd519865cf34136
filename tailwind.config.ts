import typography from '@tailwindcss/typography';
import type { Config } from 'tailwindcss';

export default {
	content: ['./src/**/*.{html,js,svelte,ts,svx,md}', './content/**/*.{md,svx}'],
	darkMode: 'class',
	theme: {
		extend: {
			fontFamily: {
				sans: ['"Inter Variable"', 'system-ui', 'sans-serif'],
				mono: ['"IBM Plex Mono"', 'ui-monospace', 'monospace']
			}
		}
	},
	plugins: [typography]
} satisfies Config;
