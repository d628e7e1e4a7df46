import { fail, redirect } from '@sveltejs/kit';
import { message, setError, superValidate } from 'sveltekit-superforms';
import { zod4 } from 'sveltekit-superforms/adapters';
import { actorFrom } from '$lib/server/audit';
import { requireUser } from '$lib/server/auth/guards';
import { Refusal, pageRefusal } from '$lib/server/errors';
import { acknowledgeRevision, acknowledgementView } from '$lib/server/training/acknowledge';
import { acknowledgeSchema } from '$lib/schemas/training';
import type { Actions, PageServerLoad } from './$types';
import { superValidatePosted } from '$lib/server/forms';

export const load: PageServerLoad = async (event) => {
	const user = requireUser(event);
	const v = await acknowledgementView(user, event.params.doc).catch(pageRefusal);
	return {
		instruction: { docNumber: v.instruction.docNumber, title: v.instruction.title },
		revision: {
			letter: v.revision.letter,
			effectiveFrom: v.revision.effectiveFrom,
			classification: v.revision.classification
		},
		blocks: v.blocks,
		previous: v.previous && { letter: v.previous.letter, at: v.previous.at },
		current: v.current && { at: v.current.at },
		changes: v.changes,
		issued: event.url.searchParams.get('issued'),
		form: await superValidate(zod4(acknowledgeSchema))
	};
};

export const actions: Actions = {
	default: async (event) => {
		const user = requireUser(event);
		const form = await superValidatePosted(event.request, zod4(acknowledgeSchema));
		if (!form.valid) return fail(400, { form: { ...form, data: { ...form.data, secret: '' } } });
		const secret = form.data.secret;
		form.data.secret = '';
		let issued: string[] = [];
		try {
			const r = await acknowledgeRevision(
				{ ...actorFrom(event), id: user.id },
				user,
				event.params.doc,
				secret
			);
			issued = r.issued.map((i) => i.number).filter((n): n is string => !!n);
		} catch (err) {
			if (err instanceof Refusal) {
				if (err.fields?.password)
					return setError(form, 'secret', err.fields.password, { status: err.status });
				return message(form, err.message, { status: err.status });
			}
			throw err;
		}
		const q = issued.length ? `?issued=${encodeURIComponent(issued.join(','))}` : '';
		redirect(303, `/instructions/${event.params.doc}/acknowledge${q}`);
	}
};
