/**
 * The review queue as its page shows it: `listReviewQueue` (what waits, since when, by whom, and
 * whether the reader may review it) with, per line, why the reader may not review it (the state
 * machine's own message), the size of the change against what is approved now, the structure,
 * and whether the model is past its revalidate-by date; filtered by site, structure, author, kind,
 * minimum waiting time and "only what I may review". Read-only. Relative imports only.
 */
import { QueryTypes } from 'sequelize';
import { sequelize } from './db/connection';
import { diffRevisions, listReviewQueue, type ReviewQueueItem } from './revisions';
import { decide } from '../workflow/state-machine';
import { relativeChange } from '../workflow/change-size';
import type { Acting } from './workflow-common';
import { percentWords } from '../components/review/format';

/** How big a change is against what is approved now. */
export interface ChangeSize {
	/** No approved revision (model) or no approved set for this loop tag (tuning set) to compare with. */
	isNew: boolean;
	/** Largest |change| in % among the compared values; null when new or nothing comparable. */
	largestPercent: number | null;
	/** The biggest changes in words, largest first, e.g. "K −35 %", "θ +20 %" (at most three). */
	parts: string[];
	/** The reasons approval needs a comment (large-change rule), from the service's comparison. */
	largeChanges: string[];
	/** The structure changed (model revisions only). */
	structureChanged: boolean;
}

/** A line of the review queue page. */
export interface QueueRow extends ReviewQueueItem {
	/** Model structure of the revision (tuning sets: of the model's approved revision). */
	structure: string | null;
	/** Controller type of a tuning set, else null. */
	controllerType: string | null;
	/** Why the reader may not approve or send it back; null when they may. */
	cannotReview: string | null;
	change: ChangeSize;
	/** Revalidate-by date of the model's approved revision, and whether it has passed. */
	revalidateBy: string | null;
	stale: boolean;
}

/** Filters of the queue page; all optional. `minWaitingDays` keeps lines waiting at least that long. */
export interface QueueFilter {
	siteId?: number;
	structure?: string;
	authorId?: number;
	kind?: 'model_revision' | 'tuning_set';
	minWaitingDays?: number;
	reviewableOnly?: boolean;
}

/** The page: the filtered lines, how many wait in all, and the choices of the filter lists. */
export interface QueuePage {
	rows: QueueRow[];
	/** Everything waiting (before filters). */
	total: number;
	/** Of those, what the reader may review. */
	forYou: number;
	options: {
		sites: { id: number; code: string }[];
		authors: { id: number; name: string }[];
		structures: string[];
	};
	today: string;
}

const PARAMETER_SHORT: Record<string, string> = {
	k: 'K',
	tau: 'τ',
	tau2: 'τ2',
	zeta: 'ζ',
	wn: 'ωn',
	theta: 'θ',
	gain: 'gain',
	timeConstant: 'τ (dominant)'
};

function sizeFrom(changes: { label: string; percent: number | null }[], large: string[], structureChanged: boolean, isNew: boolean): ChangeSize {
	const measured = changes.filter((c): c is { label: string; percent: number } => c.percent !== null && Number.isFinite(c.percent));
	measured.sort((a, b) => Math.abs(b.percent) - Math.abs(a.percent));
	const moved = measured.filter((c) => Math.abs(c.percent) >= 0.05);
	return {
		isNew,
		largestPercent: isNew || measured.length === 0 ? null : Math.abs(measured[0].percent),
		parts: moved.slice(0, 3).map((c) => `${c.label} ${percentWords(c.percent)}`),
		largeChanges: large,
		structureChanged
	};
}

const iso = (v: unknown): string | null => (v === null || v === undefined ? null : String(v).slice(0, 10));

/**
 * The review queue page for the reader (engineers, reviewers, administrators): every waiting line
 * with the reason the reader may not review it, the change size and the stale flag; `filter`
 * applied; the filter lists built from everything waiting.
 */
export async function reviewQueuePage(acting: Acting, filter: QueueFilter = {}, now: Date = new Date()): Promise<QueuePage> {
	const all = await listReviewQueue(acting, {}, now);
	const today = now.toISOString().slice(0, 10);
	const revIds = all.filter((i) => i.kind === 'model_revision').map((i) => i.id);
	const setIds = all.filter((i) => i.kind === 'tuning_set').map((i) => i.id);
	const db = sequelize();

	const revFacts = new Map<number, { structure: string; approvedId: number | null; revalidateBy: string | null }>();
	if (revIds.length) {
		const rows = await db.query<Record<string, unknown>>(
			`SELECT r.id, r.structure, pm.approved_revision_id, DATE_FORMAT(ar.revalidate_by, '%Y-%m-%d') AS revalidate_by
			FROM model_revisions r
			JOIN plant_models pm ON pm.id = r.model_id
			LEFT JOIN model_revisions ar ON ar.id = pm.approved_revision_id
			WHERE r.id IN (:ids)`,
			{ type: QueryTypes.SELECT, replacements: { ids: revIds } }
		);
		for (const r of rows) {
			revFacts.set(Number(r.id), {
				structure: String(r.structure),
				approvedId: r.approved_revision_id === null ? null : Number(r.approved_revision_id),
				revalidateBy: iso(r.revalidate_by)
			});
		}
	}
	const setFacts = new Map<
		number,
		{ controllerType: string; structure: string | null; revalidateBy: string | null; values: [number, number | null, number | null]; previous: [number, number | null, number | null] | null }
	>();
	if (setIds.length) {
		const rows = await db.query<Record<string, unknown>>(
			`SELECT t.id, t.controller_type, t.kp, t.ti_s, t.td_s, ar.structure, DATE_FORMAT(ar.revalidate_by, '%Y-%m-%d') AS revalidate_by,
				p.kp AS p_kp, p.ti_s AS p_ti, p.td_s AS p_td, p.id AS p_id
			FROM tuning_sets t
			JOIN plant_models pm ON pm.id = t.model_id
			LEFT JOIN model_revisions ar ON ar.id = pm.approved_revision_id
			LEFT JOIN tuning_sets p ON p.model_id = t.model_id AND p.loop_tag = t.loop_tag AND p.state = 'approved'
			WHERE t.id IN (:ids)`,
			{ type: QueryTypes.SELECT, replacements: { ids: setIds } }
		);
		const n = (v: unknown) => (v === null || v === undefined ? null : Number(v));
		for (const r of rows) {
			setFacts.set(Number(r.id), {
				controllerType: String(r.controller_type),
				structure: r.structure === null ? null : String(r.structure),
				revalidateBy: iso(r.revalidate_by),
				values: [Number(r.kp), n(r.ti_s), n(r.td_s)],
				previous: r.p_id === null ? null : [Number(r.p_kp), n(r.p_ti), n(r.p_td)]
			});
		}
	}

	const rows: QueueRow[] = [];
	for (const item of all) {
		const verdict = item.canReview
			? null
			: decide('approve', {
					subject: item.kind === 'model_revision' ? 'model' : 'tuning_set',
					role: acting.user.role,
					actorId: acting.user.id,
					authorId: item.author.id,
					contributorIds: item.contributorIds,
					state: 'in_review',
					comment: 'x'
				});
		const cannotReview = verdict && !verdict.ok ? verdict.message : null;
		if (item.kind === 'model_revision') {
			const f = revFacts.get(item.id);
			let change = sizeFrom([], [], false, true);
			if (f?.approvedId && f.approvedId !== item.id) {
				const cmp = await diffRevisions(acting, f.approvedId, item.id);
				change = sizeFrom(
					cmp.parameters.map((p) => ({ label: PARAMETER_SHORT[p.key] ?? p.label, percent: p.changePercent })),
					cmp.largeChanges.map((l) => l.message),
					cmp.from.structure !== cmp.to.structure,
					false
				);
			}
			const revalidateBy = f?.approvedId ? f.revalidateBy : null;
			rows.push({
				...item,
				structure: f?.structure ?? null,
				controllerType: null,
				cannotReview,
				change,
				revalidateBy,
				stale: revalidateBy !== null && revalidateBy < today
			});
		} else {
			const f = setFacts.get(item.id);
			const labels = ['Kp', 'Ti', 'Td'];
			const change = f?.previous
				? sizeFrom(
						f.values.map((v, i) => {
							const p = f.previous![i];
							if (v === null || p === null) return { label: labels[i], percent: null };
							const r = relativeChange(p, v);
							return { label: labels[i], percent: r === null ? null : r * 100 };
						}),
						[],
						false,
						false
					)
				: sizeFrom([], [], false, true);
			rows.push({
				...item,
				structure: f?.structure ?? null,
				controllerType: f?.controllerType ?? null,
				cannotReview,
				change,
				revalidateBy: f?.revalidateBy ?? null,
				stale: f?.revalidateBy !== null && f?.revalidateBy !== undefined && f.revalidateBy < today
			});
		}
	}

	const sites = new Map<number, string>();
	const authors = new Map<number, string>();
	const structures = new Set<string>();
	for (const r of rows) {
		sites.set(r.site.id, r.site.code);
		authors.set(r.author.id, r.author.name);
		if (r.structure) structures.add(r.structure);
	}
	const shown = rows.filter(
		(r) =>
			(!filter.siteId || r.site.id === filter.siteId) &&
			(!filter.authorId || r.author.id === filter.authorId) &&
			(!filter.kind || r.kind === filter.kind) &&
			(!filter.structure || r.structure === filter.structure) &&
			(filter.minWaitingDays === undefined || r.waitingDays >= filter.minWaitingDays) &&
			(!filter.reviewableOnly || r.canReview)
	);
	return {
		rows: shown,
		total: rows.length,
		forYou: rows.filter((r) => r.canReview).length,
		options: {
			sites: [...sites].map(([id, code]) => ({ id, code })).sort((a, b) => a.code.localeCompare(b.code)),
			authors: [...authors].map(([id, name]) => ({ id, name })).sort((a, b) => a.name.localeCompare(b.name)),
			structures: [...structures].sort()
		},
		today
	};
}
