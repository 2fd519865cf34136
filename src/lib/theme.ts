/**
 * The colour theme a person chose: light, dark, or whatever their system prefers. Kept in a
 * cookie so the server renders the right theme on the first paint (no flash, no inline script).
 */
export const THEMES = ['light', 'dark', 'system'] as const;
export type Theme = (typeof THEMES)[number];

/** Name of the cookie holding the choice. */
export const THEME_COOKIE = 'll_theme';

/** One year, in seconds: how long the choice is remembered. */
export const THEME_MAX_AGE = 365 * 24 * 3600;

/** The theme named by `value`, or `system` for anything else. */
export function parseTheme(value: string | null | undefined): Theme {
	return value === 'light' || value === 'dark' ? value : 'system';
}

/** The classes of the app's root element for a theme (`dark` turns on Tailwind's dark variant). */
export function themeClass(theme: Theme): string {
	return theme === 'dark' ? 'theme-dark dark' : theme === 'light' ? 'theme-light' : 'theme-system';
}

/** A same-site path to go back to after choosing, or `/` for anything that is not one. */
export function safeReturnPath(value: unknown): string {
	if (typeof value !== 'string' || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return '/';
	return value.length > 2000 ? '/' : value;
}
