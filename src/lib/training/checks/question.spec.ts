import { describe, expect, it } from 'vitest';
import { questionFormSchema } from '../../schemas/checks';
import { buildQuestion, questionToForm } from './question';

const form = (fields: Record<string, unknown>) =>
	questionFormSchema.parse({ prompt: 'Q?', ...fields });

describe('buildQuestion', () => {
	it('builds a single-choice question keyed by the letter of the marked box', () => {
		const r = buildQuestion(
			form({ kind: 'single', choices: ['4 h', '', '30 min'], correct: ['c'] })
		);
		expect(r).toMatchObject({
			ok: true,
			question: {
				choices: [
					{ id: 'a', text: '4 h' },
					{ id: 'c', text: '30 min' }
				],
				answerKey: { correct: 'c' }
			}
		});
	});

	it('asks for exactly one correct choice, and two distinct choices', () => {
		expect(
			buildQuestion(form({ kind: 'single', choices: ['x', 'y'], correct: ['a', 'b'] }))
		).toMatchObject({
			ok: false,
			errors: { correct: expect.any(String) }
		});
		expect(
			buildQuestion(form({ kind: 'multiple', choices: ['x', 'X'], correct: ['a'] }))
		).toMatchObject({
			ok: false,
			errors: { choices: expect.any(String) }
		});
	});

	it('builds numeric questions with a unit and refuses a missing tolerance', () => {
		const ok = buildQuestion(
			form({ kind: 'numeric', value: '240', tolerance: '5', toleranceKind: 'abs', unit: 'min' })
		);
		expect(ok).toMatchObject({
			ok: true,
			question: { answerKey: { value: 240, tolerance: 5, toleranceKind: 'abs', unit: 'min' } }
		});
		expect(buildQuestion(form({ kind: 'numeric', value: '240', unit: 'min' }))).toMatchObject({
			ok: false,
			errors: { tolerance: expect.any(String) }
		});
	});

	it('round-trips through the editor form', () => {
		const f = form({
			kind: 'calculated',
			prompt: 'Force for {bumpCount} bumps at {pressureMPa} MPa?',
			calculatorId: 'bond-force',
			output: 'forceN',
			unit: 'N',
			tolerancePct: '2',
			params:
				'basis = bump\nbumpWidthUm = 18\nbumpLengthUm = 95\nbumpCount: 1000..1300 step 50\npressureMPa: 50..80 step 5'
		});
		const r = buildQuestion(f);
		expect(r.ok).toBe(true);
		if (r.ok) expect(questionToForm(r.question)).toEqual(f);
	});
});
