/**
 * Errors of the control engine that callers can show to a user: an input that cannot be
 * analysed, with the request field it concerns (dotted path, e.g. `plant.den`, `controller.ti`).
 */

/** Invalid or unanalysable input; `field` names the offending request field (dotted path). */
export class AnalysisInputError extends Error {
	readonly field: string;
	constructor(field: string, message: string) {
		super(message);
		this.name = 'AnalysisInputError';
		this.field = field;
	}
}
