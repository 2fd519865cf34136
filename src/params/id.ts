import type { ParamMatcher } from '@sveltejs/kit';

/** Matches a positive integer id without leading zeros (1 … 4294967295, the UNSIGNED INT range of our keys). */
export const match = ((param: string): param is string => {
	if (!/^[1-9][0-9]{0,9}$/.test(param)) return false;
	return Number(param) <= 4_294_967_295;
}) satisfies ParamMatcher;
