// The question editor's form handling, shared by the "new question" and "edit question" pages.
import { error, fail, redirect, type RequestEvent } from '@sveltejs/kit';
import { message, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '../../audit';
import { requireRole } from '../../auth/guards';
import { Refusal } from '../../errors';
import { listCalculators } from '../../../calculators/registry';
import { questionFormSchema, type QuestionForm } from '../../../schemas/checks';
import { buildQuestion } from '../../../training/checks/question';
import { CHECK_AUTHOR_ROLES } from './queries';
import { getCheck, getVersion } from './queries';
import { saveQuestion } from './authoring';

type Event = RequestEvent<{ id: string; v: string; q?: string }>;

/** The draft version addressed by the URL; anything else 404s or goes back to the version. */
export async function draftForEditor(event: Event) {
	const user = requireRole(event, ...CHECK_AUTHOR_ROLES);
	const check = await getCheck(Number(event.params.id));
	const version = check && (await getVersion(check.id, Number(event.params.v)));
	if (!check || !version) error(404, { message: 'No such knowledge check version.' });
	const back = `/checks/${check.id}/versions/${version.id}`;
	return { user, check, version, back };
}

/** What the editor shows about each calculator: its number inputs and outputs, with ranges. */
export function calculatorChoices() {
	return listCalculators().map((c) => ({
		id: c.id,
		title: c.title,
		outputs: c.outputs
			.filter((o) => o.kind === 'number')
			.map((o) => ({ name: o.name, label: o.label, unit: o.unit })),
		inputs: c.inputs
			.filter((i) => i.kind !== 'list')
			.map((i) =>
				i.kind === 'select'
					? {
							name: i.name,
							label: i.label,
							unit: '',
							range: i.options.map((o) => o.value).join(' | ')
						}
					: {
							name: i.name,
							label: i.label,
							unit: i.unit,
							range: `${i.min ?? '−∞'}${i.minExclusive ? ' (excl.)' : ''} … ${i.max ?? '∞'}${i.maxExclusive ? ' (excl.)' : ''}${i.integer ? ', whole' : ''}`
						}
			)
	}));
}

export async function editorForm(initial: Partial<QuestionForm>) {
	return superValidate(initial, zod4(questionFormSchema), { errors: false });
}

/** Validates the posted question for its kind and saves it; field errors keep the input. */
export async function saveQuestionFromForm(event: Event, questionId: number | null) {
	const { user, version, back } = await draftForEditor(event);
	const form = await superValidate(event.request, zod4(questionFormSchema));
	if (!form.valid) return fail(400, { form });
	const built = buildQuestion(form.data);
	if (!built.ok) {
		// Array fields keep their own messages under _errors, as superforms shapes them.
		const arrays = new Set(['choices', 'correct']);
		for (const [field, msg] of Object.entries(built.errors))
			(form.errors as Record<string, unknown>)[field] = arrays.has(field)
				? { _errors: [msg] }
				: [msg];
		return message(form, 'Check the marked fields.', { status: 400 });
	}
	try {
		await saveQuestion(
			{ ...actorFrom(event), id: user.id },
			version.id,
			questionId,
			built.question
		);
	} catch (err) {
		if (err instanceof Refusal) {
			if (err.status === 404) error(404, { message: err.message });
			return message(form, err.message, { status: err.status });
		}
		throw err;
	}
	redirect(303, back);
}
