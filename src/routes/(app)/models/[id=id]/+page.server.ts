import katex from 'katex';
import { error, fail } from '@sveltejs/kit';
import { numericTransferFunctionTex, symbolicTransferFunctionTex } from '$lib/format';
import { parameterRows } from '$lib/components/model/parameters';
import { can } from '$lib/auth/roles';
import { fieldErrors, formValues, tuningSetSchema } from '$lib/schemas/tuning-set';
import { httpStatusOf, isExpectedError, ServiceError } from '$lib/server/errors';
import { getModelPage } from '$lib/server/models';
import { modelRevisionQuerySchema, queryValues } from '$lib/schemas/review';
import { actorOf, orHttpError } from '$lib/server/route-errors';
import { saveTuningDraft } from '$lib/server/tuning-sets';
import type { Actions, PageServerLoad } from './$types';

/** KaTeX to HTML on the server: the page needs no client script for its equations. */
const tex = (source: string, displayMode = false) =>
	katex.renderToString(source, { displayMode, throwOnError: false, output: 'htmlAndMathml', strict: false });

/** The read-only model page: the approved revision (or a draft for engineers), its facts and notes. */
export const load = (async ({ params, locals, url }) => {
	const actor = actorOf(locals.user);
	// `?revision=<id>` shows another revision of this model (drafts for engineers and above).
	const chosen = modelRevisionQuerySchema.safeParse(queryValues(url.searchParams));
	if (!chosen.success) error(400, chosen.error.issues[0].message);
	const model = await orHttpError(getModelPage(actor, Number(params.id), undefined, { revisionId: chosen.data.revision ?? null }));
	const r = model.revision;
	const tfInput = { structure: r.structure, parameters: r.parameters, num: r.num, den: r.den, delaySeconds: r.delaySeconds };
	return {
		model,
		canReadDrafts: can(actor.role, 'model.read_draft'),
		equations: {
			symbolic: tex(symbolicTransferFunctionTex(r.structure, r.parameters), true),
			numeric: tex(numericTransferFunctionTex(tfInput, r.timeUnit), true)
		},
		parameters: parameterRows(r).map((row) => ({ ...row, symbolHtml: tex(row.symbolTex) })),
		bench: {
			// The bench's plant in seconds, the signals for units and the proportional band, and the
			// tuning sets it can reset to or compare (withdrawn ones left out).
			model: { plant: { num: r.num, den: r.den, delay: r.delaySeconds }, timeUnit: r.timeUnit, pv: r.pv, mv: r.mv },
			revisionId: r.id,
			savedSets: model.tuningSets.filter((t) => t.state !== 'withdrawn'),
			canSave: can(actor.role, 'tuning.save_draft'),
			saveBlocked:
				model.status === 'withdrawn'
					? 'This model is withdrawn: no new tuning sets are saved against it.'
					: !model.isApproved || model.approvedRevisionId === null
						? 'Tuning sets are saved against the approved revision; this model has none yet.'
						: model.approvedRevisionId !== r.id
							? `Tuning sets are saved against the approved revision; this page shows revision ${r.no}. Open the approved revision to save one.`
							: null
		}
	};
}) satisfies PageServerLoad;

export const actions = {
	/**
	 * Saves the bench's settings as a draft tuning set of this model (engineers and reviewers; the
	 * service checks the role and the model's state again). Errors come back under
	 * `saveTuningSet.errors`, keyed by field.
	 */
	saveTuningSet: async ({ request, params, locals, getClientAddress }) => {
		const data = formValues(await request.formData());
		const values = { loopTag: data.loopTag ?? '', notes: data.notes ?? '' };
		const user = locals.user;
		if (!user) return fail(401, { saveTuningSet: { ok: false as const, errors: { _form: 'Sign in to save a tuning set.' }, values } });
		const parsed = tuningSetSchema().safeParse(data);
		if (!parsed.success) return fail(400, { saveTuningSet: { ok: false as const, errors: fieldErrors(parsed.error), values } });
		try {
			// The settings were computed on the revision the page showed: it must still be the approved one.
			const current = await getModelPage(actorOf(user), Number(params.id));
			if (current.approvedRevisionId === null || String(current.approvedRevisionId) !== (data.revisionId ?? '')) {
				const message = 'The settings were computed on a revision that is not the approved one (any more). Reload the page and check them on the approved revision before saving.';
				return fail(409, { saveTuningSet: { ok: false as const, errors: { _form: message }, values } });
			}
			const saved = await saveTuningDraft(
				{ user: { id: user.id, email: user.email, name: user.name, role: user.role }, ip: getClientAddress() },
				Number(params.id),
				parsed.data
			);
			return { saveTuningSet: { ok: true as const, id: saved.id, loopTag: saved.loopTag } };
		} catch (e) {
			if (!isExpectedError(e)) throw e;
			const errors: Record<string, string> = { ...(e instanceof ServiceError ? e.fieldErrors : {}) };
			if (Object.keys(errors).length === 0) errors._form = e.message;
			return fail(httpStatusOf(e), { saveTuningSet: { ok: false as const, errors, values } });
		}
	}
} satisfies Actions;
