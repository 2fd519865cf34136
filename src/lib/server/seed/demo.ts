/**
 * Demo data of the invented scenario "Brackwater Provisions": a fictional food-and-beverage
 * company with a bakery and a dairy. Every number here is invented for the demo, except what is
 * computed from it: transfer functions (from the engine's structure conversion), the listing
 * columns `gain` and `time_constant_s`, and the tuning sets (from the engine's tuning rules).
 * Relative imports only, so scripts run it with tsx.
 */
import bcrypt from 'bcryptjs';
import type { Transaction } from 'sequelize';
import { sequelize } from '../db/connection';
import {
	Area,
	Asset,
	initModels,
	ModelRevision,
	Note,
	PlantModel,
	RevisionContributor,
	Site,
	TuningSet,
	User,
	type AssetKind,
	type IdentificationMethod,
	type ModelParameters,
	type RevisionState,
	type Structure
} from '../db/models';
import { recordAudit } from '../audit';
import { DEMO_USERS } from './demo-users';
import { plantTransferFunction, type PlantStructure } from '../../control/plants';
import { defaultRuleParameter, tune, type TuningRuleId } from '../../control/tuning';

/** bcrypt cost of the demo users' password hashes (2^10 rounds). */
export const DEMO_BCRYPT_COST = 10;

/** Thrown when the database already holds users, sites or models: the demo never goes over data. */
export class DemoSeedRefused extends Error {}

/** What the seed wrote, by table. */
export interface DemoSeedSummary {
	counts: Record<string, number>;
}

// ── Scenario ─────────────────────────────────────────────────────────────────────────────────

type UserKey = 'viewer' | 'priya' | 'marek' | 'tomas' | 'ines' | 'grace';
const USER_KEYS: Record<UserKey, string> = {
	viewer: 'viewer@brackwater.example',
	priya: 'engineer@brackwater.example',
	marek: 'engineer2@brackwater.example',
	tomas: 'reviewer@brackwater.example',
	ines: 'reviewer2@brackwater.example',
	grace: 'admin@brackwater.example'
};

interface DemoSite {
	code: string;
	name: string;
	description: string;
	areas: { code: string; name: string; description: string }[];
}

const SITES: DemoSite[] = [
	{
		code: 'BKY',
		name: 'Brackwater Bakery — Tallowgate',
		description: 'Bread and rolls: two proofers, three-zone tunnel oven, deck ovens, cooling spiral and wrapping.',
		areas: [
			{ code: 'PRF', name: 'Proofing', description: 'Final proofers ahead of the tunnel oven.' },
			{ code: 'OVN', name: 'Ovens', description: 'Gas-fired tunnel oven (three zones) and electric deck ovens.' },
			{ code: 'PKG', name: 'Cooling and packaging', description: 'Cooling spiral, slicers and flow-wrappers.' },
			{ code: 'UTL', name: 'Bakery utilities', description: 'Steam, glycol chilling for dough mixing, process water.' }
		]
	},
	{
		code: 'DAI',
		name: 'Brackwater Dairy — Wrenfold Mill',
		description: 'Milk reception, HTST pasteurisation, CIP and a skim-milk powder spray dryer.',
		areas: [
			{ code: 'RCV', name: 'Milk reception', description: 'Tanker intake and raw-milk silos.' },
			{ code: 'PST', name: 'Pasteurisation', description: 'HTST plate pasteuriser with balance tank and homogeniser.' },
			{ code: 'CIP', name: 'Cleaning in place', description: 'Caustic/acid CIP set serving reception and pasteurisation.' },
			{ code: 'SPD', name: 'Spray drying', description: 'Single-stage spray dryer with rotary atomiser feed.' },
			{ code: 'UTD', name: 'Dairy utilities', description: 'Boiler house, compressed air and cooling tower.' }
		]
	}
];

interface DemoAsset {
	site: string;
	area: string;
	tag: string;
	kind: AssetKind;
	name: string;
	description: string;
}

const ASSETS: DemoAsset[] = [
	{ site: 'BKY', area: 'PRF', tag: 'TIC-1101', kind: 'other', name: 'Proofer 1 air temperature', description: 'Steam coil heating of the final proofer air.' },
	{ site: 'BKY', area: 'PRF', tag: 'MIC-1102', kind: 'other', name: 'Proofer 1 humidity', description: 'Live-steam injection into the proofer air.' },
	{ site: 'BKY', area: 'PRF', tag: 'TIC-1201', kind: 'other', name: 'Proofer 2 air temperature', description: 'Hot-water coil heating of the second proofer.' },
	{ site: 'BKY', area: 'OVN', tag: 'TIC-2104', kind: 'oven', name: 'Tunnel oven zone 1 burner', description: 'Ribbon burner of the first baking zone.' },
	{ site: 'BKY', area: 'OVN', tag: 'TIC-2105', kind: 'oven', name: 'Tunnel oven zone 2 burner', description: 'Ribbon burner of the second baking zone.' },
	{ site: 'BKY', area: 'OVN', tag: 'TIC-2106', kind: 'oven', name: 'Tunnel oven zone 3 burner', description: 'Ribbon burner of the colouring zone.' },
	{ site: 'BKY', area: 'OVN', tag: 'TIC-2201', kind: 'oven', name: 'Deck oven 2 hearth heaters', description: 'Electric hearth elements on thyristor control.' },
	{ site: 'BKY', area: 'PKG', tag: 'SIC-3101', kind: 'conveyor', name: 'Cooling spiral drive', description: 'Variable-speed drive of the cooling spiral belt.' },
	{ site: 'BKY', area: 'PKG', tag: 'TIC-3102', kind: 'other', name: 'Flow-wrapper sealing jaws', description: 'Cartridge-heated end-seal jaws of wrapper 1.' },
	{ site: 'BKY', area: 'UTL', tag: 'TIC-4101', kind: 'chiller', name: 'Glycol chiller supply', description: 'Two-compressor glycol chiller for dough-mixer jackets.' },
	{ site: 'BKY', area: 'UTL', tag: 'PIC-4201', kind: 'boiler', name: 'Steam header pressure', description: 'Bakery steam header fed by the packaged boiler.' },
	{ site: 'BKY', area: 'UTL', tag: 'LIC-4301', kind: 'tank', name: 'Process water break tank', description: '6 m³ break tank ahead of the dough-water meters.' },
	{ site: 'DAI', area: 'RCV', tag: 'FIC-5101', kind: 'pump', name: 'Raw-milk intake pump', description: 'Centrifugal tanker-intake pump on a variable-speed drive.' },
	{ site: 'DAI', area: 'RCV', tag: 'LIC-5102', kind: 'tank', name: 'Raw-milk silo 2', description: '100 m³ insulated raw-milk silo.' },
	{ site: 'DAI', area: 'PST', tag: 'TIC-6101', kind: 'heat_exchanger', name: 'HTST hold-tube temperature', description: 'Pasteurisation temperature at the hold-tube outlet.' },
	{ site: 'DAI', area: 'PST', tag: 'FIC-6103', kind: 'pump', name: 'HTST timing pump', description: 'Positive-displacement timing pump on a drive.' },
	{ site: 'DAI', area: 'PST', tag: 'LIC-6105', kind: 'tank', name: 'HTST balance tank', description: 'Float-free level control of the 400 L balance tank.' },
	{ site: 'DAI', area: 'PST', tag: 'PIC-6106', kind: 'valve', name: 'Homogeniser back-pressure', description: 'Pneumatic second-stage homogenising valve.' },
	{ site: 'DAI', area: 'CIP', tag: 'TIC-7101', kind: 'heat_exchanger', name: 'CIP supply temperature', description: 'Steam heater on the CIP supply line.' },
	{ site: 'DAI', area: 'CIP', tag: 'FIC-7102', kind: 'pump', name: 'CIP supply pump', description: 'CIP supply pump on a variable-speed drive.' },
	{ site: 'DAI', area: 'CIP', tag: 'TIC-7103', kind: 'other', name: 'CIP return temperature', description: 'Return-line temperature of the pasteuriser circuit.' },
	{ site: 'DAI', area: 'CIP', tag: 'AIC-7104', kind: 'pump', name: 'Caustic dosing pump', description: 'Diaphragm dosing pump for the caustic tank make-up.' },
	{ site: 'DAI', area: 'SPD', tag: 'TIC-8101', kind: 'dryer', name: 'Spray dryer inlet air', description: 'Indirect gas air heater of the spray dryer.' },
	{ site: 'DAI', area: 'SPD', tag: 'PIC-8103', kind: 'pump', name: 'Atomiser feed pump', description: 'Concentrate feed pump to the rotary atomiser.' },
	{ site: 'DAI', area: 'SPD', tag: 'TIC-8102', kind: 'dryer', name: 'Spray dryer outlet air', description: 'Outlet air temperature trimmed by the concentrate feed rate.' },
	{ site: 'DAI', area: 'UTD', tag: 'LIC-9101', kind: 'boiler', name: 'Boiler drum level', description: 'Feedwater control of the 6 t/h fire-tube boiler.' },
	{ site: 'DAI', area: 'UTD', tag: 'TIC-9102', kind: 'fan', name: 'Cooling tower fan 1', description: 'Induced-draught fan of the cooling tower on a drive.' },
	{ site: 'DAI', area: 'UTD', tag: 'PIC-9103', kind: 'other', name: 'Compressed air header', description: 'Header pressure by variable-speed screw compressor.' }
];

interface Signal {
	name: string;
	unit: string;
	min: number;
	max: number;
}

/** One revision as the scenario tells it; times in days relative to the seed run. */
interface DemoRevision {
	state: RevisionState;
	structure: Structure;
	/**
	 * Structure parameters; times in seconds, ωn in rad/s. Underdamped SOPDT: k, wn, zeta, theta.
	 * Rational models give num/den here (descending powers of s); they are stored in the num/den
	 * columns, and `parameters` keeps only theta.
	 */
	params: ModelParameters & { num?: number[]; den?: number[] };
	method: IdentificationMethod;
	/** Days before the seed run when the step test (or datasheet reading) took place. */
	testedDaysAgo: number;
	fit?: { r2: number; rmse: number };
	op: { mv: number; pv: number; note: string };
	validRange: string;
	/** Days after the seed run by which the model must be checked again (negative = overdue). */
	revalidateInDays: number;
	author: UserKey;
	reviewer?: UserKey;
	/** Days before the seed run when the revision was written. */
	createdDaysAgo: number;
	changeSummary: string;
	reviewComment?: string;
}

interface DemoTuning {
	rule: TuningRuleId;
	controller: 'PI' | 'PID';
	/** τc or λ in seconds; absent = the rule's published default. */
	parameter?: number;
	filterN?: number;
	state: 'approved' | 'draft' | 'in_review';
	author: UserKey;
	reviewer?: UserKey;
	notes: string;
}

interface DemoModel {
	tag: string;
	title: string;
	timeUnit: 's' | 'min';
	mv: Signal;
	pv: Signal;
	revisions: DemoRevision[];
	withdrawn?: { by: UserKey; daysAgo: number; reason: string };
	notes?: { title: string; author: UserKey; body: string }[];
	tuning?: DemoTuning[];
}

const pct = (name: string): Signal => ({ name, unit: '%', min: 0, max: 100 });

/** Shorthand for an approved revision written `createdDaysAgo` days ago. */
function approved(
	r: Omit<DemoRevision, 'state' | 'changeSummary'> & { changeSummary?: string }
): DemoRevision {
	return { state: 'approved', changeSummary: 'First identification.', ...r };
}

const MODELS: DemoModel[] = [
	// ── Bakery: proofing ──
	{
		tag: 'TIC-1101',
		title: 'Proofer 1 air temperature from steam-coil valve',
		timeUnit: 'min',
		mv: pct('Steam coil valve'),
		pv: { name: 'Proofer air temperature', unit: '°C', min: 20, max: 45 },
		revisions: [
			approved({
				structure: 'fopdt',
				params: { k: 0.42, tau: 480, theta: 45 },
				method: 'step_test',
				testedDaysAgo: 200,
				fit: { r2: 0.962, rmse: 0.18 },
				op: { mv: 38, pv: 36, note: 'Loaded with 600 g tins, doors closed, 3 racks.' },
				validRange: 'Valve 25–55 %, air 32–40 °C',
				revalidateInDays: 160,
				author: 'priya',
				reviewer: 'tomas',
				createdDaysAgo: 195
			})
		]
	},
	{
		tag: 'MIC-1102',
		title: 'Proofer 1 humidity from steam injection',
		timeUnit: 's',
		mv: pct('Steam injection valve'),
		pv: { name: 'Relative humidity', unit: '%RH', min: 40, max: 95 },
		revisions: [
			{
				state: 'superseded',
				structure: 'fopdt',
				params: { k: 0.81, tau: 180, theta: 25 },
				method: 'two_point',
				testedDaysAgo: 420,
				op: { mv: 30, pv: 78, note: 'Before the injection nozzles were replaced.' },
				validRange: 'Valve 20–45 %, 70–85 %RH',
				revalidateInDays: -60,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 415,
				changeSummary: 'First identification.'
			},
			{
				state: 'approved',
				structure: 'fopdt',
				params: { k: 0.65, tau: 210, theta: 30 },
				method: 'least_squares',
				testedDaysAgo: 90,
				fit: { r2: 0.948, rmse: 0.9 },
				op: { mv: 34, pv: 80, note: 'New nozzles; proofer at 36 °C.' },
				validRange: 'Valve 20–50 %, 72–88 %RH',
				revalidateInDays: 275,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 85,
				changeSummary: 'Re-identified after the steam injection nozzles were replaced: lower gain, slightly slower.'
			}
		],
		notes: [
			{
				title: 'Why the gain dropped',
				author: 'marek',
				body:
					'The new nozzles atomise finer, so less steam condenses on the coil. The least-squares fit gives\n' +
					'$$G(s) = \\frac{0.65\\,e^{-30 s}}{210 s + 1}$$\n' +
					'in %RH per % valve. Compared with the old model the gain ratio is $0.65/0.81 \\approx 0.80$.'
			}
		]
	},
	{
		tag: 'TIC-1201',
		title: 'Proofer 2 air temperature from hot-water valve',
		timeUnit: 'min',
		mv: pct('Hot-water coil valve'),
		pv: { name: 'Proofer air temperature', unit: '°C', min: 20, max: 45 },
		revisions: [
			approved({
				structure: 'sopdt',
				params: { k: 0.31, tau: 540, tau2: 150, theta: 40 },
				method: 'least_squares',
				testedDaysAgo: 150,
				fit: { r2: 0.981, rmse: 0.11 },
				op: { mv: 45, pv: 35, note: 'Hot-water supply at 80 °C.' },
				validRange: 'Valve 30–65 %, air 32–39 °C',
				revalidateInDays: 215,
				author: 'priya',
				reviewer: 'ines',
				createdDaysAgo: 145
			})
		]
	},
	// ── Bakery: ovens ──
	{
		tag: 'TIC-2104',
		title: 'Zone 1 air temperature from burner firing rate (bread)',
		timeUnit: 'min',
		mv: pct('Burner firing rate'),
		pv: { name: 'Zone 1 air temperature', unit: '°C', min: 150, max: 300 },
		revisions: [
			{
				state: 'superseded',
				structure: 'fopdt',
				params: { k: 2.5, tau: 600, theta: 75 },
				method: 'step_test',
				testedDaysAgo: 500,
				fit: { r2: 0.93, rmse: 1.6 },
				op: { mv: 50, pv: 230, note: 'Tin bread, belt 2.1 m/min.' },
				validRange: 'Firing 40–65 %, 215–245 °C',
				revalidateInDays: -135,
				author: 'priya',
				reviewer: 'tomas',
				createdDaysAgo: 495,
				changeSummary: 'First identification.'
			},
			{
				state: 'approved',
				structure: 'fopdt',
				params: { k: 2.1, tau: 540, theta: 60 },
				method: 'least_squares',
				testedDaysAgo: 120,
				fit: { r2: 0.971, rmse: 1.1 },
				op: { mv: 55, pv: 235, note: 'Tin bread, belt 2.1 m/min, after the burner service.' },
				validRange: 'Firing 40–70 %, 220–250 °C',
				revalidateInDays: 245,
				author: 'priya',
				reviewer: 'tomas',
				createdDaysAgo: 115,
				changeSummary: 'Re-identified after the burner service; the least-squares fit replaces the tangent construction.'
			}
		],
		notes: [
			{
				title: 'Reading the zone 1 model',
				author: 'priya',
				body:
					'First order plus dead time, identified from a 10 % firing-rate step:\n\n' +
					'$$G(s) = \\frac{K\\,e^{-\\theta s}}{\\tau s + 1},\\quad K = 2.1\\ \\mathrm{^\\circ C/\\%},\\ \\tau = 9\\ \\text{min},\\ \\theta = 1\\ \\text{min}.$$\n\n' +
					'The normalised dead time is $\\theta/(\\theta+\\tau) = 0.1$: lag-dominant, so PI is enough.\n' +
					'Zone 2 interacts through the shared tunnel air; step one zone at a time.'
			}
		],
		tuning: [
			{ rule: 'simc', controller: 'PI', state: 'approved', author: 'priya', reviewer: 'tomas', notes: 'SIMC with τc = θ; checked on the bench against a 5 °C set-point step.' },
			{ rule: 'amigo', controller: 'PI', state: 'draft', author: 'marek', notes: 'AMIGO for comparison: softer, less overshoot on load changes.' }
		]
	},
	{
		tag: 'TIC-2104',
		title: 'Zone 1 air temperature from burner firing rate (rolls, low fire)',
		timeUnit: 'min',
		mv: pct('Burner firing rate'),
		pv: { name: 'Zone 1 air temperature', unit: '°C', min: 150, max: 300 },
		revisions: [
			approved({
				structure: 'fopdt',
				params: { k: 2.7, tau: 660, theta: 70 },
				method: 'step_test',
				testedDaysAgo: 100,
				fit: { r2: 0.955, rmse: 1.4 },
				op: { mv: 32, pv: 210, note: 'Soft rolls on trays, belt 3.0 m/min.' },
				validRange: 'Firing 25–40 %, 200–220 °C',
				revalidateInDays: 265,
				author: 'marek',
				reviewer: 'ines',
				createdDaysAgo: 96
			})
		]
	},
	{
		tag: 'TIC-2105',
		title: 'Zone 2 air temperature from burner firing rate',
		timeUnit: 'min',
		mv: pct('Burner firing rate'),
		pv: { name: 'Zone 2 air temperature', unit: '°C', min: 150, max: 300 },
		revisions: [
			approved({
				structure: 'sopdt',
				params: { k: 1.8, tau: 620, tau2: 95, theta: 40 },
				method: 'least_squares',
				testedDaysAgo: 118,
				fit: { r2: 0.984, rmse: 0.8 },
				op: { mv: 48, pv: 225, note: 'Tin bread, belt 2.1 m/min.' },
				validRange: 'Firing 35–65 %, 210–240 °C',
				revalidateInDays: 247,
				author: 'priya',
				reviewer: 'ines',
				createdDaysAgo: 113
			})
		]
	},
	{
		tag: 'TIC-2106',
		title: 'Zone 3 air temperature from burner firing rate',
		timeUnit: 'min',
		mv: pct('Burner firing rate'),
		pv: { name: 'Zone 3 air temperature', unit: '°C', min: 150, max: 300 },
		revisions: [
			approved({
				structure: 'sopdt',
				params: { k: 1.6, tau: 700, tau2: 120, theta: 50 },
				method: 'least_squares',
				testedDaysAgo: 300,
				fit: { r2: 0.975, rmse: 0.9 },
				op: { mv: 42, pv: 215, note: 'Tin bread, belt 2.1 m/min.' },
				validRange: 'Firing 30–60 %, 200–230 °C',
				revalidateInDays: 65,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 296
			}),
			{
				state: 'in_review',
				structure: 'sopdt',
				params: { k: 1.45, tau: 680, tau2: 130, theta: 55 },
				method: 'least_squares',
				testedDaysAgo: 12,
				fit: { r2: 0.979, rmse: 0.85 },
				op: { mv: 45, pv: 218, note: 'After the zone 3 extraction damper was re-set.' },
				validRange: 'Firing 30–60 %, 200–235 °C',
				revalidateInDays: 365,
				author: 'marek',
				createdDaysAgo: 10,
				changeSummary: 'New step test after the extraction damper change: gain down about 9 %, dead time up 5 s.'
			}
		]
	},
	{
		tag: 'TIC-2201',
		title: 'Deck oven 2 hearth temperature from heater power',
		timeUnit: 'min',
		mv: pct('Thyristor power'),
		pv: { name: 'Hearth temperature', unit: '°C', min: 100, max: 320 },
		revisions: [
			approved({
				structure: 'fopdt',
				params: { k: 3.2, tau: 900, theta: 90 },
				method: 'two_point',
				testedDaysAgo: 420,
				op: { mv: 60, pv: 250, note: 'Empty hearth, doors shut.' },
				validRange: 'Power 45–75 %, 230–270 °C',
				// The one model past its revalidate-by date: the hearth stones were replaced since.
				revalidateInDays: -45,
				author: 'priya',
				reviewer: 'tomas',
				createdDaysAgo: 415
			})
		]
	},
	// ── Bakery: cooling and packaging ──
	{
		tag: 'SIC-3101',
		title: 'Cooling spiral belt speed from drive reference',
		timeUnit: 's',
		mv: pct('Drive speed reference'),
		pv: { name: 'Belt motor speed', unit: 'rpm', min: 0, max: 1450 },
		revisions: [
			approved({
				structure: 'second_order',
				params: { k: 14.5, wn: 4.0, zeta: 0.7 },
				method: 'datasheet',
				testedDaysAgo: 250,
				op: { mv: 55, pv: 800, note: 'Full spiral, 1.2 t of product on the belt.' },
				validRange: 'Reference 30–90 %',
				revalidateInDays: 480,
				author: 'marek',
				reviewer: 'ines',
				createdDaysAgo: 248
			})
		]
	},
	{
		tag: 'SIC-3101',
		title: 'Cooling spiral belt speed, empty belt',
		timeUnit: 's',
		mv: pct('Drive speed reference'),
		pv: { name: 'Belt motor speed', unit: 'rpm', min: 0, max: 1450 },
		revisions: [
			approved({
				structure: 'second_order',
				params: { k: 14.5, wn: 6.5, zeta: 0.45 },
				method: 'step_test',
				testedDaysAgo: 240,
				fit: { r2: 0.991, rmse: 6.5 },
				op: { mv: 40, pv: 580, note: 'Start-up with an empty belt.' },
				validRange: 'Reference 20–60 %',
				revalidateInDays: 490,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 238
			})
		]
	},
	{
		tag: 'TIC-3102',
		title: 'Sealing jaw temperature from heater output',
		timeUnit: 's',
		mv: pct('Cartridge heater output'),
		pv: { name: 'Jaw temperature', unit: '°C', min: 100, max: 220 },
		revisions: [
			approved({
				structure: 'fopdt',
				params: { k: 2.8, tau: 95, theta: 6 },
				method: 'step_test',
				testedDaysAgo: 60,
				fit: { r2: 0.988, rmse: 0.4 },
				op: { mv: 52, pv: 165, note: 'Wrapping 800 g loaves, 45 packs/min.' },
				validRange: 'Output 35–70 %, 150–185 °C',
				revalidateInDays: 305,
				author: 'priya',
				reviewer: 'ines',
				createdDaysAgo: 58
			})
		]
	},
	// ── Bakery: utilities ──
	{
		tag: 'TIC-4101',
		title: 'Glycol supply temperature from compressor capacity (one compressor)',
		timeUnit: 'min',
		mv: pct('Compressor capacity'),
		pv: { name: 'Glycol supply temperature', unit: '°C', min: -10, max: 10 },
		revisions: [
			approved({
				structure: 'sopdt',
				params: { k: -0.085, tau: 420, tau2: 150, theta: 35 },
				method: 'least_squares',
				testedDaysAgo: 80,
				fit: { r2: 0.957, rmse: 0.07 },
				op: { mv: 60, pv: -4, note: 'Two mixers on, one compressor running.' },
				validRange: 'Capacity 40–85 %, −6 to −2 °C',
				revalidateInDays: 285,
				author: 'priya',
				reviewer: 'tomas',
				createdDaysAgo: 77,
				changeSummary: 'First identification. Reverse acting: more capacity lowers the temperature.'
			})
		]
	},
	{
		tag: 'TIC-4101',
		title: 'Glycol supply temperature from compressor capacity (two compressors)',
		timeUnit: 'min',
		mv: pct('Compressor capacity'),
		pv: { name: 'Glycol supply temperature', unit: '°C', min: -10, max: 10 },
		revisions: [
			{
				state: 'changes_requested',
				structure: 'sopdt',
				params: { k: -0.16, tau: 380, tau2: 140, theta: 35 },
				method: 'two_point',
				testedDaysAgo: 20,
				op: { mv: 55, pv: -5, note: 'Four mixers on, both compressors running.' },
				validRange: 'Capacity 40–80 %',
				revalidateInDays: 345,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 18,
				changeSummary: 'Second operating point with both compressors in service.',
				reviewComment:
					'The two-point method cannot separate τ1 and τ2 this well. Please fit the logged data by least squares and state the glycol flow during the test.'
			}
		]
	},
	{
		tag: 'PIC-4201',
		title: 'Steam header pressure from boiler firing rate',
		timeUnit: 's',
		mv: pct('Boiler firing rate'),
		pv: { name: 'Header pressure', unit: 'bar(g)', min: 0, max: 12 },
		revisions: [
			{
				state: 'superseded',
				structure: 'fopdt',
				params: { k: 0.05, tau: 90, theta: 10 },
				method: 'step_test',
				testedDaysAgo: 380,
				fit: { r2: 0.91, rmse: 0.06 },
				op: { mv: 55, pv: 8.4, note: 'Winter load, both proofers on.' },
				validRange: 'Firing 40–70 %, 7.5–9 bar(g)',
				revalidateInDays: -15,
				author: 'marek',
				reviewer: 'ines',
				createdDaysAgo: 375,
				changeSummary: 'First identification.'
			},
			{
				state: 'approved',
				structure: 'fopdt',
				params: { k: 0.045, tau: 75, theta: 8 },
				method: 'least_squares',
				testedDaysAgo: 40,
				fit: { r2: 0.962, rmse: 0.04 },
				op: { mv: 58, pv: 8.5, note: 'Summer load after the economiser was fitted.' },
				validRange: 'Firing 40–75 %, 7.5–9.5 bar(g)',
				revalidateInDays: 325,
				author: 'marek',
				reviewer: 'ines',
				createdDaysAgo: 36,
				changeSummary: 'Re-identified after the economiser retrofit.'
			}
		],
		tuning: [
			{ rule: 'lambda', controller: 'PI', parameter: 150, state: 'approved', author: 'marek', reviewer: 'ines', notes: 'λ = 2τ: calm header, the proofers do not need fast pressure recovery.' }
		]
	},
	{
		tag: 'LIC-4301',
		title: 'Break tank level from inlet valve',
		timeUnit: 's',
		mv: pct('Inlet valve'),
		pv: { name: 'Tank level', unit: '%', min: 0, max: 100 },
		revisions: [
			approved({
				structure: 'ipdt',
				params: { k: 0.0042, theta: 12 },
				method: 'first_principles',
				testedDaysAgo: 160,
				op: { mv: 45, pv: 60, note: 'Kv from valve Cv at 3 bar and the 6 m³ tank area; delay from the pipe run.' },
				validRange: 'Level 20–90 %',
				revalidateInDays: 560,
				author: 'priya',
				reviewer: 'ines',
				createdDaysAgo: 155
			})
		],
		tuning: [{ rule: 'simc', controller: 'PI', parameter: 120, state: 'approved', author: 'priya', reviewer: 'ines', notes: 'Averaging level control: τc = 120 s lets the tank absorb the meter draws.' }]
	},
	// ── Dairy: reception ──
	{
		tag: 'FIC-5101',
		title: 'Intake flow from pump speed',
		timeUnit: 's',
		mv: pct('Pump speed reference'),
		pv: { name: 'Intake flow', unit: 'm³/h', min: 0, max: 35 },
		revisions: [
			approved({
				structure: 'fopdt',
				params: { k: 0.32, tau: 4.5, theta: 1.2 },
				method: 'step_test',
				testedDaysAgo: 70,
				fit: { r2: 0.973, rmse: 0.25 },
				op: { mv: 60, pv: 19, note: 'Tanker at 4 °C, filter clean.' },
				validRange: 'Speed 35–90 %, 8–30 m³/h',
				revalidateInDays: 295,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 68
			})
		]
	},
	{
		tag: 'LIC-5102',
		title: 'Silo 2 level from intake flow set-point',
		timeUnit: 'min',
		mv: pct('Intake flow set-point'),
		pv: { name: 'Silo level', unit: '%', min: 0, max: 100 },
		revisions: [
			approved({
				structure: 'ipdt',
				params: { k: 8.3e-5, theta: 15 },
				method: 'first_principles',
				testedDaysAgo: 300,
				op: { mv: 70, pv: 55, note: '30 m³/h at 100 % into 100 m³: 0.0083 %/s per 100 % of set-point.' },
				validRange: 'Level 10–95 %',
				revalidateInDays: 430,
				author: 'marek',
				reviewer: 'ines',
				createdDaysAgo: 298
			})
		]
	},
	// ── Dairy: pasteurisation ──
	{
		tag: 'TIC-6101',
		title: 'Hold-tube temperature from hot-water valve',
		timeUnit: 's',
		mv: pct('Hot-water valve'),
		pv: { name: 'Hold-tube outlet temperature', unit: '°C', min: 60, max: 85 },
		revisions: [
			{
				state: 'superseded',
				structure: 'sopdt',
				params: { k: 0.5, tau: 85, tau2: 30, theta: 14 },
				method: 'least_squares',
				testedDaysAgo: 330,
				fit: { r2: 0.95, rmse: 0.12 },
				op: { mv: 50, pv: 72.8, note: 'Whole milk, 10 m³/h.' },
				validRange: 'Valve 35–65 %, 72–75 °C',
				revalidateInDays: -5,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 325,
				changeSummary: 'First identification.'
			},
			{
				state: 'approved',
				structure: 'rational',
				// 0.48(25s + 1) / ((80s + 1)(30s + 1)(8s + 1)), delay 12 s: the regeneration section adds a lead.
				params: { num: [12, 0.48], den: [19200, 3280, 118, 1], theta: 12 },
				method: 'least_squares',
				testedDaysAgo: 65,
				fit: { r2: 0.986, rmse: 0.06 },
				op: { mv: 52, pv: 72.8, note: 'Whole milk, 10 m³/h, regeneration 88 %.' },
				validRange: 'Valve 35–70 %, 72–76 °C, 8–11 m³/h',
				revalidateInDays: 120,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 60,
				changeSummary: 'Third-order fit with a lead term: the SOPDT missed the regeneration feedback.'
			},
			{
				state: 'in_review',
				structure: 'rational',
				// 0.46(22s + 1) / ((78s + 1)(28s + 1)(9s + 1)), delay 12 s.
				params: { num: [10.12, 0.46], den: [19656, 3138, 115, 1], theta: 12 },
				method: 'least_squares',
				testedDaysAgo: 6,
				fit: { r2: 0.989, rmse: 0.05 },
				op: { mv: 54, pv: 72.9, note: 'Semi-skimmed milk, 10 m³/h.' },
				validRange: 'Valve 35–70 %, 72–76 °C, 8–11 m³/h',
				revalidateInDays: 365,
				author: 'marek',
				createdDaysAgo: 5,
				changeSummary: 'Refit on semi-skimmed milk for the new product run.'
			}
		],
		notes: [
			{
				title: 'Legal minimum and what the model is for',
				author: 'tomas',
				body:
					'The divert valve, not this loop, guards the legal minimum hold temperature. The model is used to keep the\n' +
					'temperature close above it with little overshoot. Lead-lag form:\n\n' +
					'$$G(s) = \\frac{0.48\\,(25s+1)}{(80s+1)(30s+1)(8s+1)}\\,e^{-12 s}$$\n\n' +
					'Follow the site pasteuriser procedure before any change to this loop.'
			}
		]
	},
	{
		tag: 'FIC-6103',
		title: 'Timing pump flow from drive reference',
		timeUnit: 's',
		mv: pct('Drive speed reference'),
		pv: { name: 'Product flow', unit: 'm³/h', min: 0, max: 12 },
		revisions: [
			approved({
				structure: 'second_order',
				params: { k: 0.12, wn: 2.5, zeta: 0.85 },
				method: 'step_test',
				testedDaysAgo: 140,
				fit: { r2: 0.978, rmse: 0.08 },
				op: { mv: 83, pv: 10, note: 'Whole milk at 4 °C inlet.' },
				validRange: 'Reference 60–95 %',
				revalidateInDays: 225,
				author: 'marek',
				reviewer: 'ines',
				createdDaysAgo: 138
			})
		]
	},
	{
		tag: 'LIC-6105',
		title: 'Balance tank level from inlet valve',
		timeUnit: 's',
		mv: pct('Inlet valve'),
		pv: { name: 'Balance tank level', unit: '%', min: 0, max: 100 },
		revisions: [
			{
				state: 'in_review',
				structure: 'ipdt',
				params: { k: 0.0055, theta: 2 },
				method: 'step_test',
				testedDaysAgo: 9,
				fit: { r2: 0.968, rmse: 0.7 },
				op: { mv: 50, pv: 55, note: 'Timing pump at 10 m³/h.' },
				validRange: 'Level 30–80 %',
				revalidateInDays: 365,
				author: 'priya',
				createdDaysAgo: 8,
				changeSummary: 'First identification of the balance tank after the float valve was replaced by a control valve.'
			}
		]
	},
	{
		tag: 'PIC-6106',
		title: 'Homogenising pressure from second-stage valve',
		timeUnit: 's',
		mv: pct('Valve air signal'),
		pv: { name: 'Homogenising pressure', unit: 'bar', min: 0, max: 250 },
		revisions: [
			approved({
				structure: 'sopdt',
				params: { k: 2.2, wn: 1.25, zeta: 0.5, theta: 0.3 },
				method: 'least_squares',
				testedDaysAgo: 110,
				fit: { r2: 0.962, rmse: 1.8 },
				op: { mv: 68, pv: 150, note: 'Whole milk, 10 m³/h, first stage at 150 bar.' },
				validRange: 'Signal 55–80 %, 120–180 bar',
				revalidateInDays: 255,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 107,
				changeSummary: 'First identification; the pressure rings after a step, hence the underdamped model.'
			})
		]
	},
	// ── Dairy: CIP ──
	{
		tag: 'TIC-7101',
		title: 'CIP supply temperature from steam valve',
		timeUnit: 's',
		mv: pct('Steam valve'),
		pv: { name: 'CIP supply temperature', unit: '°C', min: 20, max: 90 },
		revisions: [
			approved({
				structure: 'fopdt',
				params: { k: 0.75, tau: 95, theta: 20 },
				method: 'step_test',
				testedDaysAgo: 75,
				fit: { r2: 0.969, rmse: 0.5 },
				op: { mv: 62, pv: 75, note: 'Caustic wash, 18 m³/h.' },
				validRange: 'Valve 40–85 %, 65–82 °C',
				revalidateInDays: 290,
				author: 'priya',
				reviewer: 'tomas',
				createdDaysAgo: 73
			})
		]
	},
	{
		tag: 'TIC-7101',
		title: 'CIP supply temperature from steam valve, four-lag fit',
		timeUnit: 's',
		mv: pct('Steam valve'),
		pv: { name: 'CIP supply temperature', unit: '°C', min: 20, max: 90 },
		revisions: [
			approved({
				structure: 'rational',
				// 0.8 / ((60s + 1)(30s + 1)(15s + 1)(8s + 1)), delay 20 s: heater shell, line and probe lags kept apart.
				params: { num: [0.8], den: [216000, 52200, 3990, 113, 1], theta: 20 },
				method: 'least_squares',
				testedDaysAgo: 70,
				fit: { r2: 0.991, rmse: 0.3 },
				op: { mv: 62, pv: 75, note: 'Caustic wash, 18 m³/h; same test as the first-order model, fitted with four lags.' },
				validRange: 'Valve 40–85 %, 65–82 °C',
				revalidateInDays: 295,
				author: 'marek',
				reviewer: 'ines',
				createdDaysAgo: 68,
				changeSummary: 'Higher-order fit of the supply-temperature step test, for checking derivative action.'
			})
		]
	},
	{
		tag: 'FIC-7102',
		title: 'CIP supply flow from pump speed',
		timeUnit: 's',
		mv: pct('Pump speed reference'),
		pv: { name: 'CIP supply flow', unit: 'm³/h', min: 0, max: 30 },
		revisions: [
			approved({
				structure: 'fopdt',
				params: { k: 0.28, tau: 3, theta: 0.8 },
				method: 'step_test',
				testedDaysAgo: 75,
				fit: { r2: 0.982, rmse: 0.2 },
				op: { mv: 64, pv: 18, note: 'Pasteuriser circuit, caustic at 75 °C.' },
				validRange: 'Speed 40–95 %, 10–26 m³/h',
				revalidateInDays: 290,
				author: 'priya',
				reviewer: 'ines',
				createdDaysAgo: 73
			}),
			{
				state: 'draft',
				structure: 'fopdt',
				params: { k: 0.3, tau: 2.6, theta: 0.8 },
				method: 'step_test',
				testedDaysAgo: 3,
				fit: { r2: 0.975, rmse: 0.22 },
				op: { mv: 64, pv: 19, note: 'Reception circuit.' },
				validRange: 'Speed 40–95 %',
				revalidateInDays: 365,
				author: 'marek',
				createdDaysAgo: 2,
				changeSummary: 'Draft: the reception circuit behaves a little faster; not yet submitted.'
			}
		]
	},
	{
		tag: 'TIC-7103',
		title: 'CIP return temperature from supply temperature set-point',
		timeUnit: 'min',
		mv: { name: 'Supply temperature set-point', unit: '°C', min: 20, max: 90 },
		pv: { name: 'CIP return temperature', unit: '°C', min: 20, max: 90 },
		revisions: [
			approved({
				structure: 'sopdt',
				params: { k: 0.68, tau: 140, tau2: 60, theta: 75 },
				method: 'least_squares',
				testedDaysAgo: 260,
				fit: { r2: 0.944, rmse: 0.9 },
				op: { mv: 75, pv: 68, note: 'Pasteuriser circuit, return probe at the old position.' },
				validRange: 'Set-point 60–85 °C',
				revalidateInDays: 100,
				author: 'priya',
				reviewer: 'ines',
				createdDaysAgo: 255
			})
		],
		withdrawn: {
			by: 'tomas',
			daysAgo: 30,
			reason: 'The return probe was moved to the CIP set during the pipework change; this model no longer describes the loop.'
		}
	},
	{
		tag: 'AIC-7104',
		title: 'Caustic concentration from dosing pump stroke rate',
		timeUnit: 's',
		mv: pct('Stroke rate'),
		pv: { name: 'Caustic concentration', unit: '% w/w', min: 0, max: 3 },
		revisions: [
			approved({
				structure: 'fopdt',
				params: { k: 0.018, tau: 60, theta: 25 },
				method: 'step_test',
				testedDaysAgo: 180,
				fit: { r2: 0.921, rmse: 0.03 },
				op: { mv: 40, pv: 1.5, note: 'Tank recirculating, 70 °C.' },
				validRange: 'Stroke 20–70 %, 1.2–1.8 % w/w',
				revalidateInDays: 185,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 176
			}),
			{
				state: 'in_review',
				structure: 'fopdt',
				params: { k: 0.016, tau: 75, theta: 28 },
				method: 'least_squares',
				testedDaysAgo: 14,
				fit: { r2: 0.947, rmse: 0.025 },
				op: { mv: 45, pv: 1.5, note: 'New conductivity cell, tank at 70 °C.' },
				validRange: 'Stroke 20–70 %, 1.2–1.8 % w/w',
				revalidateInDays: 365,
				author: 'priya',
				createdDaysAgo: 12,
				changeSummary: 'Refit after the conductivity cell was replaced.'
			}
		]
	},
	// ── Dairy: spray drying ──
	{
		tag: 'TIC-8101',
		title: 'Inlet air temperature from air-heater firing (skim powder)',
		timeUnit: 'min',
		mv: pct('Air heater firing'),
		pv: { name: 'Inlet air temperature', unit: '°C', min: 120, max: 230 },
		revisions: [
			{
				state: 'superseded',
				structure: 'fopdt',
				params: { k: 1.5, tau: 300, theta: 60 },
				method: 'two_point',
				testedDaysAgo: 400,
				op: { mv: 62, pv: 185, note: 'Skim concentrate at 48 % solids.' },
				validRange: 'Firing 50–75 %',
				revalidateInDays: -35,
				author: 'priya',
				reviewer: 'ines',
				createdDaysAgo: 395,
				changeSummary: 'First identification.'
			},
			{
				state: 'approved',
				structure: 'sopdt',
				params: { k: 1.4, tau: 240, tau2: 45, theta: 20 },
				method: 'least_squares',
				testedDaysAgo: 50,
				fit: { r2: 0.987, rmse: 0.6 },
				op: { mv: 64, pv: 185, note: 'Skim concentrate at 48 % solids, 3.2 t/h water evaporation.' },
				validRange: 'Firing 50–80 %, 175–200 °C',
				revalidateInDays: 315,
				author: 'priya',
				reviewer: 'ines',
				createdDaysAgo: 47,
				changeSummary: 'Second-order fit: the heat-exchanger wall adds a second lag that the FOPDT hid in its dead time.'
			}
		],
		tuning: [
			{ rule: 'simc', controller: 'PID', parameter: 20, filterN: 10, state: 'approved', author: 'priya', reviewer: 'ines', notes: 'SIMC series PID with τc = θ; derivative filter N = 10.' },
			{ rule: 'simc', controller: 'PI', parameter: 40, state: 'in_review', author: 'marek', notes: 'PI alternative with τc = 2θ for operators who dislike derivative kick.' }
		]
	},
	{
		tag: 'TIC-8101',
		title: 'Inlet air temperature from air-heater firing (whole-milk powder)',
		timeUnit: 'min',
		mv: pct('Air heater firing'),
		pv: { name: 'Inlet air temperature', unit: '°C', min: 120, max: 230 },
		revisions: [
			approved({
				structure: 'sopdt',
				params: { k: 1.55, tau: 260, tau2: 50, theta: 22 },
				method: 'least_squares',
				testedDaysAgo: 45,
				fit: { r2: 0.982, rmse: 0.7 },
				op: { mv: 55, pv: 165, note: 'Whole-milk concentrate at 45 % solids.' },
				validRange: 'Firing 45–70 %, 155–175 °C',
				revalidateInDays: 320,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 43
			})
		]
	},
	{
		tag: 'TIC-8102',
		title: 'Outlet air temperature from concentrate feed rate',
		timeUnit: 'min',
		mv: pct('Feed pump speed'),
		pv: { name: 'Outlet air temperature', unit: '°C', min: 60, max: 110 },
		revisions: [
			approved({
				structure: 'rational',
				// −0.55(40s + 1) / ((300s + 1)(90s + 1)), delay 30 s: more feed cools the outlet air.
				params: { num: [-22, -0.55], den: [27000, 390, 1], theta: 30 },
				method: 'least_squares',
				testedDaysAgo: 55,
				fit: { r2: 0.958, rmse: 0.4 },
				op: { mv: 58, pv: 88, note: 'Skim concentrate, inlet at 185 °C.' },
				validRange: 'Feed 45–70 %, 84–92 °C',
				revalidateInDays: 310,
				author: 'priya',
				reviewer: 'tomas',
				createdDaysAgo: 52,
				changeSummary: 'First identification. Reverse acting; the lead comes from the atomiser wheel load.'
			})
		]
	},
	{
		tag: 'PIC-8103',
		title: 'Atomiser feed pressure from feed pump speed',
		timeUnit: 's',
		mv: pct('Feed pump speed'),
		pv: { name: 'Feed pressure', unit: 'bar', min: 0, max: 10 },
		revisions: [
			approved({
				structure: 'sopdt',
				params: { k: 0.095, wn: 0.8, zeta: 0.6, theta: 0.4 },
				method: 'step_test',
				testedDaysAgo: 50,
				fit: { r2: 0.94, rmse: 0.05 },
				op: { mv: 58, pv: 5.5, note: 'Skim concentrate at 48 % solids, 45 °C.' },
				validRange: 'Speed 45–75 %',
				revalidateInDays: 315,
				author: 'marek',
				reviewer: 'ines',
				createdDaysAgo: 48
			})
		]
	},
	// ── Dairy: utilities ──
	{
		tag: 'LIC-9101',
		title: 'Drum level from feedwater valve (with swell)',
		timeUnit: 's',
		mv: pct('Feedwater valve'),
		pv: { name: 'Drum level', unit: '%', min: 0, max: 100 },
		revisions: [
			approved({
				structure: 'rational',
				// 0.0035(−8s + 1) / (s(4s + 1)), delay 2 s: integrating with inverse response (swell).
				params: { num: [-0.028, 0.0035], den: [4, 1, 0], theta: 2 },
				method: 'least_squares',
				testedDaysAgo: 130,
				fit: { r2: 0.913, rmse: 0.9 },
				op: { mv: 48, pv: 50, note: '4.5 t/h steam, single-element control during the test.' },
				validRange: 'Level 35–65 %, steam 3–6 t/h',
				revalidateInDays: 235,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 127,
				changeSummary: 'First identification with the swell (right-half-plane zero) kept in the model.'
			})
		],
		notes: [
			{
				title: 'Shrink and swell',
				author: 'marek',
				body:
					'More cold feedwater first collapses steam bubbles, so the level dips before it rises. The zero at\n' +
					'$s = +1/8\\ \\mathrm{s^{-1}}$ limits how fast the level loop may be: keep the closed-loop time constant\n' +
					'well above $8$ s. Follow the boiler-house procedure and the boiler inspector\'s conditions before retuning.'
			}
		]
	},
	{
		tag: 'LIC-9101',
		title: 'Drum level from feedwater valve (simplified)',
		timeUnit: 's',
		mv: pct('Feedwater valve'),
		pv: { name: 'Drum level', unit: '%', min: 0, max: 100 },
		revisions: [
			approved({
				structure: 'ipdt',
				params: { k: 0.0035, theta: 14 },
				method: 'two_point',
				testedDaysAgo: 130,
				op: { mv: 48, pv: 50, note: 'Swell folded into the dead time (half-rule style).' },
				validRange: 'Level 35–65 %',
				revalidateInDays: 235,
				author: 'marek',
				reviewer: 'ines',
				createdDaysAgo: 126
			})
		]
	},
	{
		tag: 'TIC-9102',
		title: 'Cooling-water basin temperature from fan speed',
		timeUnit: 'min',
		mv: pct('Fan speed reference'),
		pv: { name: 'Basin temperature', unit: '°C', min: 10, max: 40 },
		revisions: [
			approved({
				structure: 'fopdt',
				params: { k: -0.06, tau: 600, theta: 90 },
				method: 'step_test',
				testedDaysAgo: 210,
				fit: { r2: 0.902, rmse: 0.15 },
				op: { mv: 55, pv: 27, note: 'Summer, wet bulb 18 °C.' },
				validRange: 'Fan 30–90 %, 24–30 °C',
				revalidateInDays: 155,
				author: 'priya',
				reviewer: 'tomas',
				createdDaysAgo: 205
			})
		]
	},
	{
		tag: 'TIC-9102',
		title: 'Cooling tower fan speed from drive reference',
		timeUnit: 's',
		mv: pct('Drive speed reference'),
		pv: { name: 'Fan speed', unit: 'rpm', min: 0, max: 1480 },
		revisions: [
			approved({
				structure: 'second_order',
				params: { k: 14.8, wn: 0.9, zeta: 1.2 },
				method: 'datasheet',
				testedDaysAgo: 210,
				op: { mv: 55, pv: 814, note: 'Drive ramp limits set to 10 s.' },
				validRange: 'Reference 20–100 %',
				revalidateInDays: 520,
				author: 'priya',
				reviewer: 'ines',
				createdDaysAgo: 205
			})
		]
	},
	{
		tag: 'PIC-9103',
		title: 'Compressed-air header pressure from compressor speed',
		timeUnit: 's',
		mv: pct('Compressor speed'),
		pv: { name: 'Header pressure', unit: 'bar(g)', min: 0, max: 10 },
		revisions: [
			approved({
				structure: 'ipdt',
				params: { k: 0.0009, theta: 3 },
				method: 'step_test',
				testedDaysAgo: 90,
				fit: { r2: 0.935, rmse: 0.03 },
				op: { mv: 65, pv: 7, note: 'Receiver 3 m³, weekday demand.' },
				validRange: '6.5–7.5 bar(g)',
				revalidateInDays: 275,
				author: 'marek',
				reviewer: 'tomas',
				createdDaysAgo: 88
			})
		]
	}
];

// ── Derived listing columns ──────────────────────────────────────────────────────────────────

/**
 * The engine's plant structure for a revision as stored: `structure` and `parameters` (k, tau,
 * tau2, zeta, wn, theta; seconds and rad/s) plus, for rational models, the num/den coefficients.
 * An SOPDT with wn and zeta is the underdamped form. Throws an Error naming the missing parameter.
 */
export function plantOfRevision(
	structure: Structure,
	parameters: ModelParameters,
	coefficients: { num?: number[]; den?: number[] } = {}
): PlantStructure {
	const need = (name: keyof ModelParameters): number => {
		const v = parameters[name];
		if (typeof v !== 'number') throw new Error(`parameters.${name} is required for a ${structure} model`);
		return v;
	};
	const theta = parameters.theta ?? 0;
	switch (structure) {
		case 'fopdt':
			return { structure: 'fopdt', k: need('k'), tau: need('tau'), theta };
		case 'sopdt':
			if (parameters.tau2 === undefined && parameters.wn !== undefined) {
				return { structure: 'sopdt-underdamped', k: need('k'), wn: need('wn'), zeta: need('zeta'), theta };
			}
			return { structure: 'sopdt', k: need('k'), tau: need('tau'), tau2: need('tau2'), theta };
		case 'ipdt':
			return { structure: 'ipdt', k: need('k'), theta };
		case 'second_order':
			return { structure: 'second-order', k: need('k'), wn: need('wn'), zeta: need('zeta') };
		case 'rational':
			if (!coefficients.num || !coefficients.den) throw new Error('num and den are required for a rational model');
			return { structure: 'rational', num: coefficients.num, den: coefficients.den, delay: theta };
	}
}

/** −1/Re of the slower pole of ωn²/(s² + 2ζωn s + ωn²): 1/(ζωn) for ζ < 1, else 1/(ωn(ζ − √(ζ² − 1))). */
function secondOrderTimeConstant(wn: number | undefined, zeta: number | undefined): number | null {
	if (wn === undefined || zeta === undefined || !(wn > 0) || !(zeta > 0)) return null;
	return zeta < 1 ? 1 / (zeta * wn) : 1 / (wn * (zeta - Math.sqrt(zeta * zeta - 1)));
}

/**
 * The listing columns of a revision. `gain` is the steady-state gain K (FOPDT, SOPDT, second
 * order), the integrating gain Kv (IPDT) or, for a rational model, lim s→0 of s^r·G(s) where r is
 * the number of poles at the origin (the DC gain when r = 0). `time_constant_s` is the time
 * constant −1/Re(p) of the slowest pole p off the origin (dominant pole): τ (FOPDT); max(τ, τ2)
 * (overdamped SOPDT); 1/(ζωn) (underdamped SOPDT and second order with ζ < 1, the time constant
 * of the decay envelope); 1/(ωn(ζ − √(ζ² − 1))) (second order with ζ ≥ 1); null for IPDT and
 * rational models (no single time constant; their poles are shown on the model page). Pole
 * locations of the standard second-order system: Ogata, Modern Control Engineering, 5th ed.
 * (2010), §5-3.
 */
export function listingColumns(
	structure: Structure,
	p: ModelParameters,
	coefficients: { num?: number[]; den?: number[] } = {}
): { gain: number | null; timeConstantSeconds: number | null } {
	switch (structure) {
		case 'fopdt':
			return { gain: p.k ?? null, timeConstantSeconds: p.tau ?? null };
		case 'sopdt':
			if (p.tau !== undefined && p.tau2 !== undefined) return { gain: p.k ?? null, timeConstantSeconds: Math.max(p.tau, p.tau2) };
			return { gain: p.k ?? null, timeConstantSeconds: secondOrderTimeConstant(p.wn, p.zeta) };
		case 'second_order':
			return { gain: p.k ?? null, timeConstantSeconds: secondOrderTimeConstant(p.wn, p.zeta) };
		case 'ipdt':
			return { gain: p.k ?? null, timeConstantSeconds: null };
		case 'rational': {
			const num = coefficients.num ?? [];
			const den = coefficients.den ?? [];
			let r = 0;
			while (r < den.length - 1 && den[den.length - 1 - r] === 0) r++;
			const d0 = den[den.length - 1 - r];
			const n0 = num[num.length - 1];
			const gain = d0 !== undefined && n0 !== undefined && d0 !== 0 && Number.isFinite(n0 / d0) ? n0 / d0 : null;
			return { gain, timeConstantSeconds: null };
		}
	}
}

// ── Writing ──────────────────────────────────────────────────────────────────────────────────

const DAY_MS = 86_400_000;

function dayOffset(now: Date, days: number): Date {
	return new Date(now.getTime() + days * DAY_MS);
}

function dateOnly(d: Date): string {
	return d.toISOString().slice(0, 10);
}

/** The published form each rule's settings are stored in (the form the rule was written for). */
function storedSettings(
	result: { ideal: { kp: number; ti: number | null; td: number | null }; published: { form: string; kp: number; ti: number | null; td: number | null } }
): { form: 'ideal' | 'series' | 'parallel'; kp: number; ti: number | null; td: number | null } {
	const form = result.published.form;
	if (form === 'series' || form === 'ideal' || form === 'parallel') {
		return { form, kp: result.published.kp, ti: result.published.ti, td: result.published.td };
	}
	return { form: 'ideal', kp: result.ideal.kp, ti: result.ideal.ti, td: result.ideal.td };
}

/**
 * Loads the whole demo scenario in one transaction and records one `demo.seed` audit event.
 * Refuses (DemoSeedRefused) when the database already holds users, sites or plant models, so it
 * never writes over real data. Dates are relative to `now` (one model's revalidate-by date is
 * always in the past). Returns the counts written.
 */
export async function seedDemo(options: { now?: Date } = {}): Promise<DemoSeedSummary> {
	initModels();
	const now = options.now ?? new Date();
	const db = sequelize();
	const hashes = new Map<string, string>();
	for (const u of DEMO_USERS) hashes.set(u.email, await bcrypt.hash(u.password, DEMO_BCRYPT_COST));

	return db.transaction(async (transaction: Transaction) => {
		const existing = {
			users: await User.count({ transaction }),
			sites: await Site.count({ transaction }),
			models: await PlantModel.count({ transaction })
		};
		if (existing.users || existing.sites || existing.models) {
			throw new DemoSeedRefused(
				`the database is not empty (${existing.users} users, ${existing.sites} sites, ${existing.models} plant models); the demo data is only loaded into an empty database`
			);
		}
		const created = { silent: true, transaction } as const;
		const stamp = (d: Date) => ({ created_at: d, updated_at: d });
		const long = dayOffset(now, -600);

		const userIds = new Map<string, number>();
		for (const u of DEMO_USERS) {
			const row = await User.create(
				{ email: u.email, name: u.name, role: u.role, password_hash: hashes.get(u.email) as string, last_sign_in_at: null, ...stamp(long) },
				created
			);
			userIds.set(u.email, row.id);
		}
		const uid = (key: UserKey): number => {
			const id = userIds.get(USER_KEYS[key]);
			if (id === undefined) throw new Error(`demo user ${key} is missing from demo-users.ts`);
			return id;
		};

		const siteIds = new Map<string, number>();
		const areaIds = new Map<string, number>();
		for (const s of SITES) {
			const site = await Site.create({ code: s.code, name: s.name, description: s.description, ...stamp(long) }, created);
			siteIds.set(s.code, site.id);
			for (const a of s.areas) {
				const area = await Area.create({ site_id: site.id, code: a.code, name: a.name, description: a.description, ...stamp(long) }, created);
				areaIds.set(`${s.code}/${a.code}`, area.id);
			}
		}
		const assetIds = new Map<string, number>();
		for (const a of ASSETS) {
			const row = await Asset.create(
				{
					site_id: siteIds.get(a.site) as number,
					area_id: areaIds.get(`${a.site}/${a.area}`) as number,
					tag: a.tag,
					kind: a.kind,
					name: a.name,
					description: a.description,
					...stamp(long)
				},
				created
			);
			assetIds.set(a.tag, row.id);
		}

		let revisionCount = 0;
		let tuningCount = 0;
		let noteCount = 0;
		for (const m of MODELS) {
			const assetId = assetIds.get(m.tag);
			if (assetId === undefined) throw new Error(`demo model "${m.title}" names unknown asset ${m.tag}`);
			const first = m.revisions[0];
			const model = await PlantModel.create(
				{
					asset_id: assetId,
					title: m.title,
					status: 'draft',
					approved_revision_id: null,
					withdrawn_at: null,
					withdrawn_by: null,
					withdrawn_reason: null,
					created_by: uid(first.author),
					...stamp(dayOffset(now, -first.createdDaysAgo))
				},
				created
			);
			let approvedRevision: ModelRevision | null = null;
			for (const [i, r] of m.revisions.entries()) {
				const { num: givenNum, den: givenDen, ...parameters } = r.params;
				const tf = plantTransferFunction(plantOfRevision(r.structure, parameters, { num: givenNum, den: givenDen }));
				const cols = listingColumns(r.structure, parameters, tf);
				const createdAt = dayOffset(now, -r.createdDaysAgo);
				const submitted = r.state === 'draft' ? null : dayOffset(createdAt, 1);
				const reviewed = r.reviewer && r.state !== 'in_review' && r.state !== 'draft' ? dayOffset(createdAt, 3) : null;
				const wasApproved = r.state === 'approved' || r.state === 'superseded';
				const revision = await ModelRevision.create(
					{
						model_id: model.id,
						revision_no: i + 1,
						state: r.state,
						structure: r.structure,
						parameters,
						num: tf.num,
						den: tf.den,
						delay_s: tf.delay,
						gain: cols.gain,
						time_constant_s: cols.timeConstantSeconds,
						time_unit: m.timeUnit,
						mv_name: m.mv.name,
						mv_unit: m.mv.unit,
						mv_min: m.mv.min,
						mv_max: m.mv.max,
						pv_name: m.pv.name,
						pv_unit: m.pv.unit,
						pv_min: m.pv.min,
						pv_max: m.pv.max,
						op_mv: r.op.mv,
						op_pv: r.op.pv,
						op_note: r.op.note,
						method: r.method,
						test_date: dateOnly(dayOffset(now, -r.testedDaysAgo)),
						data_attachment_id: null,
						fit_r2: r.fit?.r2 ?? null,
						fit_rmse: r.fit?.rmse ?? null,
						valid_range: r.validRange,
						revalidate_by: dateOnly(dayOffset(now, r.revalidateInDays)),
						change_summary: r.changeSummary,
						review_comment: r.reviewComment ?? (wasApproved ? 'Checked against the step-test record; approved.' : null),
						author_id: uid(r.author),
						reviewer_id: r.reviewer ? uid(r.reviewer) : null,
						submitted_at: submitted,
						reviewed_at: reviewed,
						approved_at: wasApproved ? reviewed : null,
						created_at: createdAt,
						updated_at: reviewed ?? submitted ?? createdAt
					},
					created
				);
				await RevisionContributor.create({ revision_id: revision.id, user_id: uid(r.author), created_at: createdAt }, { transaction });
				revisionCount++;
				if (r.state === 'approved') approvedRevision = revision;
			}

			if (m.withdrawn) {
				const at = dayOffset(now, -m.withdrawn.daysAgo);
				if (approvedRevision) {
					approvedRevision.state = 'withdrawn';
					await approvedRevision.save({ transaction, silent: true });
				}
				await model.update(
					{
						status: 'withdrawn',
						approved_revision_id: approvedRevision?.id ?? null,
						withdrawn_at: at,
						withdrawn_by: uid(m.withdrawn.by),
						withdrawn_reason: m.withdrawn.reason,
						updated_at: at
					},
					{ transaction, silent: true }
				);
			} else if (approvedRevision) {
				await model.update(
					{ status: 'active', approved_revision_id: approvedRevision.id, updated_at: approvedRevision.approved_at ?? now },
					{ transaction, silent: true }
				);
			}

			for (const n of m.notes ?? []) {
				const at = dayOffset(now, -20);
				await Note.create({ model_id: model.id, title: n.title, body_md: n.body, author_id: uid(n.author), ...stamp(at) }, created);
				noteCount++;
			}

			for (const t of m.tuning ?? []) {
				if (!approvedRevision) throw new Error(`demo tuning set on "${m.title}" needs an approved revision`);
				const r = m.revisions.find((x) => x.state === 'approved') as DemoRevision;
				const p = r.params;
				if (r.structure !== 'fopdt' && r.structure !== 'sopdt' && r.structure !== 'ipdt') {
					throw new Error(`demo tuning set on "${m.title}": rules need an FOPDT, SOPDT or IPDT model`);
				}
				const plant = { structure: r.structure, k: p.k as number, tau: p.tau ?? null, tau2: p.tau2 ?? null, theta: p.theta ?? 0 };
				const ruleParameter = t.parameter ?? defaultRuleParameter(t.rule, plant, t.controller);
				const result = tune({ plant, rule: t.rule, controller: t.controller, parameter: ruleParameter });
				const settings = storedSettings(result);
				const at = dayOffset(now, -15);
				const isApproved = t.state === 'approved';
				await TuningSet.create(
					{
						model_id: model.id,
						model_revision_id: approvedRevision.id,
						loop_tag: m.tag,
						state: t.state,
						controller_type: t.controller,
						form: settings.form,
						kp: settings.kp,
						ti_s: settings.ti,
						td_s: settings.td,
						filter_n: t.filterN ?? null,
						weight_b: null,
						weight_c: null,
						rule: t.rule,
						rule_parameter: ruleParameter,
						predicted: null,
						notes: t.notes,
						review_comment: isApproved ? 'Bench response checked; approved for the next maintenance window.' : null,
						author_id: uid(t.author),
						reviewer_id: t.reviewer ? uid(t.reviewer) : null,
						submitted_at: t.state === 'draft' ? null : dayOffset(at, 1),
						reviewed_at: isApproved ? dayOffset(at, 2) : null,
						approved_at: isApproved ? dayOffset(at, 2) : null,
						...stamp(at)
					},
					created
				);
				tuningCount++;
			}
		}

		const counts = {
			users: DEMO_USERS.length,
			sites: SITES.length,
			areas: SITES.reduce((n, s) => n + s.areas.length, 0),
			assets: ASSETS.length,
			'plant models': MODELS.length,
			'model revisions': revisionCount,
			'tuning sets': tuningCount,
			notes: noteCount
		};
		await recordAudit(transaction, {
			actor: null,
			action: 'demo.seed',
			entityType: 'database',
			entityId: null,
			after: { scenario: 'Brackwater Provisions', seededAt: now.toISOString(), counts }
		});
		return { counts };
	});
}

/** The scenario tables, for tests that check the seed against what it promises. */
export const DEMO_SCENARIO = { sites: SITES, assets: ASSETS, models: MODELS } as const;
