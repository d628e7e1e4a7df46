// Demo knowledge checks for KBO-2: KC-COG-MB and KC-FOG-MB, written by the demo trainer and
// approved by the demo quality engineer through the same functions the pages call, so each has a
// real signature row and audit events. Question values are teaching examples for the invented
// plant, not a validated recipe. Not wired into seed.ts here; call seedChecks() after
// seedInstructions().
import { and, desc, eq, inArray, lte } from 'drizzle-orm';
import { db } from '../src/lib/server/db/index';
import { instructions, people, processes, revisions } from '../src/lib/server/db/schema/index';
import {
	approveVersion,
	createCheck,
	saveQuestion,
	submitVersion,
	updateVersionSettings
} from '../src/lib/server/training/checks/index';
import { questionFormSchema } from '../src/lib/schemas/checks';
import { buildQuestion } from '../src/lib/training/checks/question';
import { DEMO_PASSWORD } from './demo-accounts.js';

type Q = Record<string, unknown>;

const THAW: Q = {
	kind: 'single',
	prompt:
		'A reel of ACF comes out of the refrigerator in its sealed moisture-barrier bag. When may you open the bag?',
	choices: [
		'At once, so the thaw goes faster',
		'When the thaw time in the instruction has passed and the bag is at room temperature',
		'After five minutes on the warm stage of the bonder',
		'Only once the floor life on the label has run out'
	],
	correct: ['b'],
	explanation:
		'A cold reel opened early collects condensed moisture, which spoils the bond. Read the thaw step of WI-ACF-001 again.'
};

const BUFFER_CHANGE: Q = {
	kind: 'multiple',
	prompt: 'Which of these belong to a buffer sheet change on a main bonder?',
	choices: [
		'Raise and lock the head before reaching under it',
		'Let the head cool, or wear the heat-resistant gloves the plant rules ask for',
		'Make one bond first to warm the new sheet',
		'Wipe the hot head with IPA to clean it quickly'
	],
	correct: ['a', 'b'],
	explanation:
		'The head runs at 150–300 °C and moves under pneumatic force; IPA is flammable and never goes near a hot head. See the buffer sheet change instruction.'
};

const PTFE: Q = {
	kind: 'true_false',
	prompt: 'An overheated PTFE buffer sheet can give off harmful fumes.',
	trueFalse: 'true',
	explanation: 'Keep the sheet within its rated temperature and the local exhaust running.'
};

const IPA: Q = {
	kind: 'true_false',
	prompt: 'IPA may be sprayed on the bond head while it is hot, because it evaporates at once.',
	trueFalse: 'false',
	explanation: 'IPA is flammable. Clean pads and tools with IPA only away from hot surfaces.'
};

const COG: Q[] = [
	THAW,
	{
		kind: 'true_false',
		prompt:
			'A buffer sheet may stay on the head for as many bonds as it holds together without tearing.',
		trueFalse: 'false',
		explanation:
			'The sheet is changed at the interval the instruction gives: a worn sheet spreads heat and pressure unevenly long before it tears.'
	},
	BUFFER_CHANGE,
	PTFE,
	{
		kind: 'single',
		prompt:
			'The head is down on a COG part and you see the chip is misaligned. What do you do first?',
		choices: [
			'Reach in and push the chip straight while the head is down',
			'Let the cycle finish or stop it with the machine control, keep hands clear of the head, then report the part',
			'Raise the pressure so the chip settles',
			'Cool the head with IPA'
		],
		correct: ['b'],
		explanation:
			'Pinch point and hot head: never reach under a moving or lowered head. Use the machine control and the reject procedure.'
	},
	{
		kind: 'numeric',
		prompt:
			'The recipe asks for 190 °C at the bond line. The head calibration shows the bond line runs 12 °C below the head set-point. Which set-point do you enter?',
		value: '202',
		unit: '°C',
		tolerance: '1',
		toleranceKind: 'abs',
		explanation:
			'Set-point = target + offset from the latest calibration (190 + 12). The calibration record and the validated recipe govern; see the head temperature calibration instruction.'
	},
	{
		kind: 'calculated',
		prompt:
			'Bumps {bumpWidthUm} × {bumpLengthUm} µm, {bumpCount} bumps, {pressureMPa} MPa on bump area: what force in N do you enter?',
		calculatorId: 'bond-force',
		output: 'forceN',
		unit: 'N',
		tolerancePct: '2',
		params:
			'basis = bump\nbumpWidthUm = 18\nbumpLengthUm = 95\nbumpCount: 1000..1300 step 50\npressureMPa: 50..80 step 5',
		explanation:
			'Force = pressure × total bump area, and 1 MPa = 1 N/mm²: bump count × width × length in mm², times the pressure. The Bond force calculator does the same sum.'
	},
	{
		kind: 'calculated',
		prompt:
			'A COG chip has {bumpCount} bumps of {bumpWidthUm} × {bumpLengthUm} µm. The recipe gives {pressureMPa} MPa on the bump area. The bonder takes the force in kgf: what do you enter?',
		calculatorId: 'bond-force',
		output: 'forceKgf',
		unit: 'kgf',
		tolerancePct: '2',
		params:
			'basis = bump\nbumpWidthUm = 20\nbumpLengthUm: 100..140 step 10\nbumpCount: 800..1200 step 100\npressureMPa = 60',
		explanation:
			'Work out the force in N on the total bump area first, then divide by 9.80665 to get kgf.'
	},
	{
		kind: 'single',
		prompt:
			'Under the microscope a bump shows no particle indentation marks. What does it tell you?',
		choices: [
			'The bond is fine: marks only show on gold bumps',
			'Too few particles were trapped or too little pressure reached that bump: the joint may be open',
			'The ACF was thawed too long',
			'The buffer sheet was new'
		],
		correct: ['b'],
		explanation:
			'Count the marks as the indentation inspection instruction describes and report the part.'
	},
	{
		kind: 'multiple',
		prompt: 'You open a new ACF reel at the line. What goes on its floor-life label?',
		choices: [
			'The date and time it was opened',
			'The end of its floor life',
			'Your badge number',
			'Today’s head temperature'
		],
		correct: ['a', 'b', 'c'],
		explanation: 'The floor life counts from opening; see the reel handling step of WI-ACF-001.'
	}
];

const FOG: Q[] = [
	{
		kind: 'calculated',
		prompt:
			'FOG bond, {widthMm} mm × {lengthMm} mm bonded area under the tool, {pressureMPa} MPa on that area: what force in N do you enter?',
		calculatorId: 'bond-force',
		output: 'forceN',
		unit: 'N',
		tolerancePct: '2',
		params: 'basis = tool\nwidthMm: 1.2..2 step 0.1\nlengthMm: 30..60 step 5\npressureMPa = 3',
		explanation:
			'FOG pressures are quoted on the bonded area under the tool: force = pressure × width × length (1 MPa = 1 N/mm²).'
	},
	{
		kind: 'calculated',
		prompt:
			'The FPC is bonded over {widthMm} mm × {lengthMm} mm under the tool at {pressureMPa} MPa. The bonder takes kgf: what do you enter?',
		calculatorId: 'bond-force',
		output: 'forceKgf',
		unit: 'kgf',
		tolerancePct: '2',
		params: 'basis = tool\nwidthMm = 1.5\nlengthMm: 40..70 step 10\npressureMPa: 2..4 step 0.5',
		explanation: 'Force in N = pressure × area in mm²; divide by 9.80665 for kgf.'
	},
	{
		kind: 'true_false',
		prompt: 'FOG bond pressures are usually quoted on the total bump area of the chip.',
		trueFalse: 'false',
		explanation:
			'COG and COF pressures are on the bump area; FOG and FOB pressures are on the bonded area under the tool.'
	},
	THAW,
	BUFFER_CHANGE,
	{
		kind: 'numeric',
		prompt:
			'The instruction asks for at least 60 minutes of thaw. The reel came out of the refrigerator at 06:40. How many minutes after 07:00 is the earliest time you may open it?',
		value: '40',
		unit: 'min',
		tolerance: '0',
		toleranceKind: 'abs',
		explanation: '06:40 + 60 min = 07:40, which is 40 minutes after 07:00.'
	},
	{
		kind: 'single',
		prompt: 'The FOG head is coming down. Where are your hands?',
		choices: [
			'Holding the FPC in place under the head',
			'Clear of the head, on the two-hand control or away from the machine',
			'On the buffer sheet, keeping it flat',
			'Anywhere, the guard will stop the head'
		],
		correct: ['b'],
		explanation:
			'Pinch point under the pneumatic head: keep hands clear and never defeat the guards.'
	},
	IPA
];

async function personByEmail(email: string) {
	const [p] = await db
		.select({ id: people.id, displayName: people.displayName })
		.from(people)
		.where(eq(people.email, email));
	if (!p) throw new Error(`demo account ${email} missing`);
	return p;
}

/** The revision in force now of the instruction for a process (what the questions were written against). */
async function revisionInForce(processId: number): Promise<number | null> {
	const [r] = await db
		.select({ id: revisions.id })
		.from(revisions)
		.innerJoin(instructions, eq(instructions.id, revisions.instructionId))
		.where(
			and(
				eq(instructions.processId, processId),
				inArray(revisions.state, ['approved', 'superseded']),
				lte(revisions.effectiveFrom, new Date())
			)
		)
		.orderBy(desc(revisions.effectiveFrom))
		.limit(1);
	return r?.id ?? null;
}

const CHECKS = [
	{
		code: 'KC-COG-MB',
		title: 'COG main bond: thaw, buffer sheet, hot head and bond force',
		process: 'COG-MB',
		questions: COG,
		settings: {
			questionsPerAttempt: 5,
			timeLimitMin: null,
			attemptsBeforeCooldown: 2,
			cooldownMin: 30
		}
	},
	{
		code: 'KC-FOG-MB',
		title: 'FOG main bond: force on the tool area, thaw and safety',
		process: 'FOG-MB',
		questions: FOG,
		settings: {
			questionsPerAttempt: 5,
			timeLimitMin: 20,
			attemptsBeforeCooldown: 2,
			cooldownMin: 30
		}
	}
];

/** Creates the demo checks, each approved (version 1). Returns their ids by code. */
export async function seedChecks(): Promise<
	Record<string, { checkId: number; versionId: number }>
> {
	const trainer = await personByEmail('trainer@kbo2.example');
	const quality = await personByEmail('quality@kbo2.example');
	const author = { id: trainer.id, label: trainer.displayName, address: null };
	const approver = { id: quality.id, label: quality.displayName, address: null };
	const out: Record<string, { checkId: number; versionId: number }> = {};
	for (const c of CHECKS) {
		const [proc] = await db
			.select({ id: processes.id })
			.from(processes)
			.where(eq(processes.code, c.process));
		if (!proc) throw new Error(`process ${c.process} missing`);
		const { id, versionId } = await createCheck(author, {
			code: c.code,
			title: c.title,
			processId: proc.id
		});
		await updateVersionSettings(author, versionId, {
			...c.settings,
			revisionId: await revisionInForce(proc.id)
		});
		for (const raw of c.questions) {
			const built = buildQuestion(questionFormSchema.parse(raw));
			if (!built.ok) throw new Error(`${c.code}: ${JSON.stringify(built.errors)}`);
			await saveQuestion(author, versionId, null, built.question);
		}
		await submitVersion(author, versionId);
		await approveVersion(approver, versionId, { password: DEMO_PASSWORD });
		out[c.code] = { checkId: id, versionId };
	}
	return out;
}
