/**
 * CSV text for downloads: RFC 4180 quoting (Shafranovich, "Common Format and MIME Type for CSV
 * Files", RFC 4180, 2005, §2 rules 1, 5–7: CRLF line ends; a field holding a comma, a double
 * quote, CR or LF is enclosed in double quotes, and a double quote inside is doubled) and
 * protection against formula injection: a cell whose text starts with `=`, `+`, `-`, `@`, a tab
 * or a carriage return gets a leading apostrophe, so a spreadsheet shows it as text instead of
 * running it (OWASP, "CSV Injection", from memory; common practice). Pure; no imports.
 */

/** Characters that make a spreadsheet read a cell as a formula when they come first. */
const FORMULA_START = /^[=+\-@\t\r]/;
/** Characters that force a field into double quotes (RFC 4180 §2 rule 6). */
const NEEDS_QUOTES = /[",\r\n]/;

/** A value as the text of one cell: null/undefined → empty, numbers as JavaScript writes them, objects as JSON. */
export function cellText(value: unknown): string {
	if (value === null || value === undefined) return '';
	if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
	if (typeof value === 'string') return value;
	if (typeof value === 'boolean') return value ? 'true' : 'false';
	if (value instanceof Date) return Number.isNaN(value.getTime()) ? '' : value.toISOString();
	return JSON.stringify(value);
}

/** One field: formula-safe, then quoted when RFC 4180 requires it. */
export function csvField(value: unknown): string {
	let text = cellText(value);
	if (FORMULA_START.test(text)) text = `'${text}`;
	return NEEDS_QUOTES.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** One record with its CRLF line end. */
export function csvRow(values: readonly unknown[]): string {
	return `${values.map(csvField).join(',')}\r\n`;
}
