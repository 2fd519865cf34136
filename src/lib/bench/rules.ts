/**
 * What the bench's rule table and design form feed the engine: the model as a tuning-rule plant
 * (FOPDT, SOPDT or IPDT; other structures reduced by Skogestad's half rule first, said in a
 * note), every rule's settings converted to the bench's controller form, and the plant of the
 * pole-placement design. Pure functions over the engine (`src/lib/control`); seconds throughout.
 */
import {
	convertController,
	defaultRuleParameter,
	reduceRational,
	TUNING_RULES,
	tuneAll,
	TuningError,
	type ControllerForm,
	type ControllerSettings,
	type DesignPlant,
	type PlantStructure,
	type TuningControllerType,
	type TuningPlant,
	type TuningRuleId
} from '../control';

/** The plant the tuning rules see, and how it was obtained from the model. */
export type RulePlantOutcome =
	| { ok: true; plant: TuningPlant; reduced: boolean; note: string | null }
	| { ok: false; reason: string };

const sig = (x: number) => Number(x.toPrecision(4)).toString();

/**
 * The tuning-rule plant for a recognised model structure and controller type. FOPDT, SOPDT and
 * IPDT pass through. Underdamped, standard second-order and rational models are reduced by the
 * half rule (Skogestad 2003, section 3, via `reduceRational`): to SOPDT for a PID (when two lags
 * remain), to FOPDT otherwise; the note states the reduced model. When the half rule does not
 * apply (complex or unstable poles, integrators in a rational model) the reason is returned.
 */
export function rulePlantFor(structure: PlantStructure, type: TuningControllerType): RulePlantOutcome {
	switch (structure.structure) {
		case 'fopdt':
			return { ok: true, plant: { structure: 'fopdt', k: structure.k, tau: structure.tau, theta: structure.theta ?? 0 }, reduced: false, note: null };
		case 'sopdt':
			return {
				ok: true,
				plant: { structure: 'sopdt', k: structure.k, tau: structure.tau, tau2: structure.tau2, theta: structure.theta ?? 0 },
				reduced: false,
				note: null
			};
		case 'ipdt':
			return { ok: true, plant: { structure: 'ipdt', k: structure.k, theta: structure.theta ?? 0 }, reduced: false, note: null };
		default: {
			const tf =
				structure.structure === 'rational'
					? { num: structure.num, den: structure.den, delay: structure.delay ?? 0 }
					: {
							num: [structure.k * structure.wn * structure.wn],
							den: [1, 2 * structure.zeta * structure.wn, structure.wn * structure.wn],
							delay: structure.structure === 'sopdt-underdamped' ? (structure.theta ?? 0) : 0
						};
			const r = reduceRational(tf.num, tf.den, tf.delay);
			if (!r.ok) return { ok: false, reason: `The tuning rules need an FOPDT, SOPDT or IPDT model. ${r.reason}` };
			if (type === 'PID' && r.sopdt) {
				const s = r.sopdt;
				return {
					ok: true,
					plant: { structure: 'sopdt', k: s.k, tau: s.tau1, tau2: s.tau2, theta: s.theta },
					reduced: true,
					note: `Rules applied to the half-rule SOPDT approximation (Skogestad 2003): K = ${sig(s.k)}, τ1 = ${sig(s.tau1)} s, τ2 = ${sig(s.tau2)} s, θ = ${sig(s.theta)} s.`
				};
			}
			const f = r.fopdt;
			return {
				ok: true,
				plant: { structure: 'fopdt', k: f.k, tau: f.tau, theta: f.theta },
				reduced: true,
				note: `Rules applied to the half-rule FOPDT approximation (Skogestad 2003): K = ${sig(f.k)}, τ = ${sig(f.tau)} s, θ = ${sig(f.theta)} s.`
			};
		}
	}
}

/** One row of the bench's rule table. */
export interface RuleRow {
	rule: TuningRuleId;
	name: string;
	citation: string;
	publishedForm: string;
	/** Ideal-form settings (s), or null when the rule does not apply. */
	ideal: { kp: number; ti: number | null; td: number | null } | null;
	/** The settings in the bench's form, or null (see `reason` / `conversionNote`). */
	settings: ControllerSettings | null;
	/** τc or λ in seconds when the rule has one (its published default). */
	parameter: number | null;
	parameterSymbol: string | null;
	warnings: string[];
	/** Why the rule does not apply. */
	reason: string | null;
	/** Why the settings cannot be written in the bench's form (they load in ideal form instead). */
	conversionNote: string | null;
}

/**
 * Every published rule for the plant and controller type (engine `tuneAll`, default rule
 * parameters), with each result converted exactly from the ideal form to `form`
 * (`convertController`). N (derivative filter) is carried as given.
 */
export function ruleRows(plant: TuningPlant, type: TuningControllerType, form: ControllerForm, n: number | null): RuleRow[] {
	let rows: ReturnType<typeof tuneAll>;
	try {
		rows = tuneAll(plant, type);
	} catch (e) {
		if (e instanceof TuningError) return [];
		throw e;
	}
	return rows.map((row): RuleRow => {
		const info = TUNING_RULES[row.rule];
		const base = {
			rule: row.rule,
			name: row.name,
			citation: info.citation,
			publishedForm: info.publishedForm,
			parameterSymbol: info.parameter?.symbol ?? null
		};
		if (!row.result) {
			return { ...base, ideal: null, settings: null, parameter: null, warnings: [], reason: row.reason, conversionNote: null };
		}
		const ideal = row.result.ideal;
		const idealSettings: ControllerSettings = { type, form: 'ideal', kp: ideal.kp, ti: ideal.ti, td: ideal.td, n: type === 'PD' || type === 'PID' ? n : null };
		const converted = convertController(idealSettings, form);
		return {
			...base,
			ideal,
			settings: converted.ok ? converted.value : null,
			parameter: info.parameter ? defaultRuleParameter(row.rule, plant, type) : null,
			warnings: row.result.warnings,
			reason: null,
			conversionNote: converted.ok ? null : converted.reason
		};
	});
}

/** The plant of the pole-placement design, or the reason the design does not cover the model. */
export type DesignPlantOutcome = { ok: true; plant: DesignPlant } | { ok: false; reason: string };

/**
 * The design plant for a recognised structure: FOPDT → first order, SOPDT → two lags,
 * underdamped SOPDT and standard second order → ωn, ζ (dead time passed on; the design ignores it
 * and warns). IPDT and rational models are outside the design (reason returned).
 */
export function designPlantFor(structure: PlantStructure): DesignPlantOutcome {
	switch (structure.structure) {
		case 'fopdt':
			return { ok: true, plant: { structure: 'fopdt', k: structure.k, tau: structure.tau, theta: structure.theta ?? 0 } };
		case 'sopdt':
			return { ok: true, plant: { structure: 'sopdt', k: structure.k, tau: structure.tau, tau2: structure.tau2, theta: structure.theta ?? 0 } };
		case 'sopdt-underdamped':
			return { ok: true, plant: { structure: 'second_order', k: structure.k, wn: structure.wn, zeta: structure.zeta, theta: structure.theta ?? 0 } };
		case 'second-order':
			return { ok: true, plant: { structure: 'second_order', k: structure.k, wn: structure.wn, zeta: structure.zeta } };
		case 'ipdt':
			return { ok: false, reason: 'Design by pole placement covers first- and second-order models; an integrating model is outside it. Use a tuning rule (SIMC, AMIGO, lambda) instead.' };
		default:
			return { ok: false, reason: 'Design by pole placement covers first- and second-order models; this rational model is outside it. Use a tuning rule instead.' };
	}
}

/**
 * Warnings shared by more than half of the applicable rows (e.g. "rules applied to the half-rule
 * FOPDT approximation"), to show once above the table; each row keeps only its own warnings.
 */
export function commonWarnings(rows: readonly RuleRow[]): { common: string[]; own: Map<TuningRuleId, string[]> } {
	const applicable = rows.filter((r) => r.reason === null);
	const counts = new Map<string, number>();
	for (const r of applicable) for (const w of new Set(r.warnings)) counts.set(w, (counts.get(w) ?? 0) + 1);
	const common = [...counts.entries()].filter(([, n]) => n > applicable.length / 2 && n >= 2).map(([w]) => w);
	const shared = new Set(common);
	const own = new Map<TuningRuleId, string[]>();
	for (const r of rows) own.set(r.rule, r.warnings.filter((w) => !shared.has(w)));
	return { common, own };
}
