/**
 * Reusable scratch arrays for the temporaries of the engine's inner routines (matrix exponential,
 * LU solve, companion matrices, frequency scans). A new Float64Array of more than eight elements
 * costs microseconds in V8, because its backing store lives outside the JavaScript heap, and one
 * analysis needs dozens of small temporaries; reusing them saves a large share of the run time.
 *
 * Rules: each routine uses its own slots (the constants below), a scratch array is valid only
 * until the next request for the same slot and length, it is not zeroed on request, and nothing
 * that leaves the routine may be a scratch array (results are fresh arrays or copies).
 */
/** The slot of each temporary, one per routine and role, so no two users of a slot overlap in time. */
export const SLOT = {
	expmX: 0,
	expmX2: 1,
	expmX4: 2,
	expmX6: 3,
	expmOdd: 4,
	expmEven: 5,
	solveLu: 6,
	discretizeBlock: 7,
	discretizeExp: 12,
	companion: 8,
	companionRe: 9,
	companionIm: 10,
	sensitivity: 11
} as const;

const table: (Float64Array | undefined)[][] = [];

/** The scratch array of `slot` with exactly `length` elements (contents undefined: zero it if needed). */
export function scratch(slot: number, length: number): Float64Array {
	let row = table[slot];
	if (row === undefined) {
		row = [];
		table[slot] = row;
	}
	let a = row[length];
	if (a === undefined) {
		a = new Float64Array(length);
		row[length] = a;
	}
	return a;
}
