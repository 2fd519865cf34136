/**
 * The demo sign-ins of the invented Brackwater Provisions scenario. They are created by the demo
 * seed and shown on the sign-in page only when DEMO=1. Never used outside demo mode.
 */
import type { Role } from '../db/models';

export interface DemoUser {
	email: string;
	name: string;
	role: Role;
	password: string;
	/** What this person does in the scenario (shown beside the sign-in). */
	duty: string;
}

export const DEMO_PASSWORD = 'ledger-demo-2026';

export const DEMO_USERS: DemoUser[] = [
	{ email: 'viewer@brackwater.example', name: 'Olu Adeyemi', role: 'viewer', password: DEMO_PASSWORD, duty: 'Shift supervisor, bakery' },
	{ email: 'engineer@brackwater.example', name: 'Priya Nair', role: 'engineer', password: DEMO_PASSWORD, duty: 'Process-control engineer' },
	{ email: 'engineer2@brackwater.example', name: 'Marek Novak', role: 'engineer', password: DEMO_PASSWORD, duty: 'Instrument technician, dairy' },
	{ email: 'reviewer@brackwater.example', name: 'Tomas Lindqvist', role: 'reviewer', password: DEMO_PASSWORD, duty: 'Lead controls engineer' },
	{ email: 'reviewer2@brackwater.example', name: 'Ines Duarte', role: 'reviewer', password: DEMO_PASSWORD, duty: 'Automation lead, dairy' },
	{ email: 'admin@brackwater.example', name: 'Grace Okafor', role: 'admin', password: DEMO_PASSWORD, duty: 'Engineering systems administrator' }
];
