import { error, redirect } from '@sveltejs/kit';
import {
	calculatorChoices,
	draftForEditor,
	editorForm,
	saveQuestionFromForm
} from '$lib/server/training/checks/editor';
import { questionToForm } from '$lib/training/checks/question';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const { check, version, back } = await draftForEditor(event);
	// A question that does not exist is not found, whatever state its version is in.
	const q = version.questions.find((x) => x.id === Number(event.params.q));
	if (!q) error(404, { message: 'No such question in this version.' });
	if (version.state !== 'draft') redirect(303, back);
	return {
		heading: `Question #${version.questions.indexOf(q) + 1} · ${check.code} v${version.version}`,
		back,
		form: await editorForm(questionToForm(q)),
		calculators: calculatorChoices()
	};
};

export const actions: Actions = {
	default: (event) => saveQuestionFromForm(event, Number(event.params.q))
};
