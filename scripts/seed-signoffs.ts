// Demo sign-off checklists for KBO-2: one for COG main bond (WI-COG-004) and one for FOG main bond
// (WI-FOG-003), each tied to the instruction's effective revision and written by the demo trainer.
// Idempotent: a process that already has a checklist for that revision is left alone.
import { and, eq } from 'drizzle-orm';
import { db } from '../src/lib/server/db/index';
import { checklists, instructions, people } from '../src/lib/server/db/schema/index';
import { loadEffectiveRevisions } from '../src/lib/server/instructions/queries';
import { createChecklist } from '../src/lib/server/training/signoffs/checklists';

const DEMO_CHECKLISTS = [
	{
		docNumber: 'WI-COG-004',
		title: 'COG main bond — observed at the bonder',
		items: [
			'ACF reel thaw time checked on the label before the reel is opened',
			'Pads cleaned with IPA and dry before lamination',
			'Buffer sheet replaced at the interval the instruction gives',
			'Force entered matches the bump area from the Bond force calculator',
			'Head temperature reading checked against the calibration sticker',
			'Indentation count read under the microscope and recorded'
		]
	},
	{
		docNumber: 'WI-FOG-003',
		title: 'FOG main bond — observed at the bonder',
		items: [
			'ACF floor life checked on the reel log',
			'FPC aligned to the glass marks before pre-bond',
			'Buffer sheet replaced before the first bond of the shift',
			'Bond force and time entered as the recipe card gives',
			'Indentation along the lead row inspected under the microscope'
		]
	}
];

export async function seedChecklists() {
	const [trainer] = await db
		.select({ id: people.id, displayName: people.displayName })
		.from(people)
		.where(eq(people.email, 'trainer@kbo2.example'));
	if (!trainer) throw new Error('seedChecklists: the demo trainer trainer@kbo2.example is missing');
	const actor = { id: trainer.id, label: trainer.displayName, address: null };
	const effective = await loadEffectiveRevisions();
	for (const c of DEMO_CHECKLISTS) {
		const [ins] = await db
			.select({ id: instructions.id })
			.from(instructions)
			.where(eq(instructions.docNumber, c.docNumber));
		const rev = ins ? effective.get(ins.id) : undefined;
		if (!rev) throw new Error(`seedChecklists: ${c.docNumber} has no effective revision`);
		const [existing] = await db
			.select({ id: checklists.id })
			.from(checklists)
			.where(and(eq(checklists.revisionId, rev.id), eq(checklists.title, c.title)));
		if (existing) continue;
		await createChecklist(actor, { title: c.title, revisionId: rev.id, items: c.items });
	}
}
