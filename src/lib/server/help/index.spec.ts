import { describe, expect, it } from 'vitest';
import { calculatorIds } from '../../calculators/registry';
import { findHelpPage, getHelpExamples, listHelpPages } from './index';

describe('help pages', () => {
	it('lists every page in content/help with its front matter, in order', () => {
		const pages = listHelpPages();
		expect(pages.map((p) => p.slug)).toEqual([
			'writing-instructions',
			'calculator-blocks',
			'safety',
			'terminals',
			'certification',
			'station-gate',
			'records',
			'history-and-logs',
			'retention',
			'mail'
		]);
		for (const page of pages) {
			expect(page.title.length).toBeGreaterThan(5);
			expect(page.summary.length).toBeGreaterThan(20);
			expect(page.audience).not.toBe('');
		}
		expect(findHelpPage('safety')?.title).toBe('Safety notes for bonding work');
		expect(findHelpPage('../secrets')).toBeNull();
	});

	it('renders the calculator-block examples, one per calculator, without warnings', async () => {
		const examples = await getHelpExamples('calculator-blocks');
		expect(Object.keys(examples).sort()).toEqual([...calculatorIds].sort());
		for (const id of calculatorIds) {
			expect(examples[id].html).toContain(`data-calc="${id}"`);
		}
	});

	it('renders the other examples (a warning would throw)', async () => {
		const sample = await getHelpExamples('writing-instructions');
		expect(sample.sample.html).toContain('src="/help-media/indentation-even.png"');
		expect(sample.sample.html).toContain('callout-caution');
		const safety = await getHelpExamples('safety');
		expect(safety.cautions.html).toContain('callout-warning');
		expect(await getHelpExamples('terminals')).toEqual({});
	});
});
