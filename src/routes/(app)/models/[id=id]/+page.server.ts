import katex from 'katex';
import { numericTransferFunctionTex, symbolicTransferFunctionTex } from '$lib/format';
import { parameterRows } from '$lib/components/model/parameters';
import { getModelPage } from '$lib/server/models';
import { actorOf, orHttpError } from '$lib/server/route-errors';
import type { PageServerLoad } from './$types';

/** KaTeX to HTML on the server: the page needs no client script for its equations. */
const tex = (source: string, displayMode = false) =>
	katex.renderToString(source, { displayMode, throwOnError: false, output: 'htmlAndMathml', strict: false });

/** The read-only model page: the approved revision (or a draft for engineers), its facts and notes. */
export const load = (async ({ params, locals }) => {
	const actor = actorOf(locals.user);
	const model = await orHttpError(getModelPage(actor, Number(params.id)));
	const r = model.revision;
	const tfInput = { structure: r.structure, parameters: r.parameters, num: r.num, den: r.den, delaySeconds: r.delaySeconds };
	return {
		model,
		equations: {
			symbolic: tex(symbolicTransferFunctionTex(r.structure, r.parameters), true),
			numeric: tex(numericTransferFunctionTex(tfInput, r.timeUnit), true)
		},
		parameters: parameterRows(r).map((row) => ({ ...row, symbolHtml: tex(row.symbolTex) }))
	};
}) satisfies PageServerLoad;
