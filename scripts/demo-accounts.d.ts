// Types for demo-accounts.js, for the TypeScript that imports it (seed, tests).
import type { Role } from '../src/lib/roles';

export declare const DEMO_PASSWORD: string;

export interface DemoAccount {
	role: Role;
	name: string;
	email?: string;
	badge?: string;
	pin?: string;
}

export declare const DEMO_ACCOUNTS: DemoAccount[];

export declare function demoSignIns(): string;
