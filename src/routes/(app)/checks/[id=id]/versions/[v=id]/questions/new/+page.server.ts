import { redirect } from '@sveltejs/kit';
import {
	calculatorChoices,
	draftForEditor,
	editorForm,
	saveQuestionFromForm
} from '$lib/server/training/checks/editor';
import { QUESTION_KINDS, type QuestionKind } from '$lib/training/vocabulary';
import type { Actions, PageServerLoad } from './$types';

export const load: PageServerLoad = async (event) => {
	const { check, version, back } = await draftForEditor(event);
	if (version.state !== 'draft') redirect(303, back);
	const asked = event.url.searchParams.get('kind');
	const kind: QuestionKind = QUESTION_KINDS.find((k) => k === asked) ?? 'single';
	return {
		heading: `New question · ${check.code} v${version.version}`,
		back,
		form: await editorForm({ kind, points: 1, toleranceKind: 'pct' }),
		calculators: calculatorChoices()
	};
};

export const actions: Actions = {
	default: (event) => saveQuestionFromForm(event, null)
};
