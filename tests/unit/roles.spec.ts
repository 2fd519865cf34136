/**
 * Permission table, role × action, written out by hand from PRODUCT.md "Who uses it, and for what"
 * (our own product brief): viewer reads approved models and tunings and runs the calculator;
 * engineer also creates models, proposes revisions, uploads, fits and saves tuning-set drafts;
 * reviewer also approves or sends back other people's work (never their own); admin manages
 * users, roles, sites and areas and cannot bypass review.
 */
import { describe, expect, it } from 'vitest';
import { ACTIONS, ROLES, PermissionDenied, assertCan, assertCanReview, can, canReview, isRole, type Action, type Role } from '../../src/lib/auth/roles';

const Y = true;
const N = false;
//                                  viewer engineer reviewer admin
const TABLE: Record<Action, [boolean, boolean, boolean, boolean]> = {
	'model.read': [Y, Y, Y, Y],
	'tuning.read': [Y, Y, Y, Y],
	'bench.run': [Y, Y, Y, Y],
	'profile.edit_own': [Y, Y, Y, Y],
	'token.manage_own': [Y, Y, Y, Y],
	'model.read_draft': [N, Y, Y, Y],
	'model.create': [N, Y, Y, N],
	'revision.propose': [N, Y, Y, N],
	'attachment.upload': [N, Y, Y, N],
	'model.fit': [N, Y, Y, N],
	'tuning.save_draft': [N, Y, Y, N],
	'note.write': [N, Y, Y, N],
	'asset.create': [N, Y, Y, Y],
	'revision.review': [N, N, Y, N],
	'tuning.review': [N, N, Y, N],
	'model.withdraw': [N, N, Y, Y], // issue 5: reviewer or admin, with a reason
	'user.manage': [N, N, N, Y],
	'site.manage': [N, N, N, Y],
	'area.manage': [N, N, N, Y],
	'audit.read': [N, N, N, Y]
};

describe('can(role, action): every role × every action', () => {
	it('the table covers exactly the actions the code knows', () => {
		expect(Object.keys(TABLE).sort()).toEqual([...ACTIONS].sort());
		expect([...ROLES]).toEqual(['viewer', 'engineer', 'reviewer', 'admin']);
	});
	for (const action of ACTIONS) {
		ROLES.forEach((role, i) => {
			const expected = TABLE[action][i];
			it(`${role} ${expected ? 'may' : 'may not'} ${action}`, () => {
				expect(can(role, action)).toBe(expected);
				if (expected) expect(() => assertCan(role, action)).not.toThrow();
				else expect(() => assertCan(role, action)).toThrow(PermissionDenied);
			});
		});
	}
	it('nobody signed out, and no unknown role, may do anything', () => {
		for (const action of ACTIONS) {
			expect(can(null, action)).toBe(false);
			expect(can(undefined, action)).toBe(false);
			expect(can('superuser' as Role, action)).toBe(false);
		}
	});
	it('an administrator cannot approve (cannot bypass review)', () => {
		expect(can('admin', 'revision.review')).toBe(false);
		expect(can('admin', 'tuning.review')).toBe(false);
		expect(canReview({ id: 9, role: 'admin' }, 1)).toBe(false);
	});
});

describe('four-eyes review rule', () => {
	it('a reviewer may review someone else’s revision', () => {
		expect(canReview({ id: 2, role: 'reviewer' }, 1)).toBe(true);
		expect(() => assertCanReview({ id: 2, role: 'reviewer' }, 1)).not.toThrow();
	});
	it('never their own, nor one they contributed to', () => {
		expect(canReview({ id: 2, role: 'reviewer' }, 2)).toBe(false);
		expect(canReview({ id: 2, role: 'reviewer' }, 1, [3, 2])).toBe(false);
		expect(() => assertCanReview({ id: 2, role: 'reviewer' }, 2)).toThrow(/your own work/);
	});
	it('engineers and viewers never review', () => {
		expect(canReview({ id: 2, role: 'engineer' }, 1)).toBe(false);
		expect(canReview({ id: 2, role: 'viewer' }, 1)).toBe(false);
		expect(() => assertCanReview({ id: 2, role: 'engineer' }, 1)).toThrow(/Only reviewers/);
		expect(() => assertCanReview(null, 1)).toThrow(PermissionDenied);
	});
});

describe('isRole', () => {
	it('accepts the four role names only', () => {
		for (const r of ROLES) expect(isRole(r)).toBe(true);
		for (const r of ['Admin', '', 'root', null, 3, undefined]) expect(isRole(r)).toBe(false);
	});
});
