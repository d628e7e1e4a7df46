import { describe, expect, it } from 'vitest';
import { csvCell, csvRow } from './csv';

// Quoting rules: RFC 4180 §2 (fields with comma, quote, CR or LF are enclosed in double quotes;
// a quote inside is doubled; records end with CRLF). Formula neutralisation: OWASP "CSV
// Injection" (prefix cells starting with = + - @ tab or CR with an apostrophe).
describe('csvCell', () => {
	it('leaves plain text and numbers alone', () => {
		expect(csvCell('L2-FOG-03')).toBe('L2-FOG-03');
		expect(csvCell('Nguyễn Thị Minh Châu')).toBe('Nguyễn Thị Minh Châu');
		expect(csvCell(42)).toBe('42');
		expect(csvCell(-5)).toBe('-5');
		expect(csvCell(null)).toBe('');
		expect(csvCell(undefined)).toBe('');
	});

	it('neutralises every formula trigger at the start of a text cell', () => {
		expect(csvCell('=1+1')).toBe("'=1+1");
		expect(csvCell('+49 30 1234')).toBe("'+49 30 1234");
		expect(csvCell('-2+3')).toBe("'-2+3");
		expect(csvCell('@SUM(A1)')).toBe("'@SUM(A1)");
		expect(csvCell('\tcmd')).toBe("'\tcmd");
		expect(csvCell('\r=cmd')).toBe('"\'\r=cmd"');
	});

	it('quotes and still neutralises a formula that needs quoting', () => {
		expect(csvCell('=HYPERLINK("http://x.example","click")')).toBe(
			'"\'=HYPERLINK(""http://x.example"",""click"")"'
		);
	});

	it('quotes commas, quotes and line breaks (RFC 4180)', () => {
		expect(csvCell('a,b')).toBe('"a,b"');
		expect(csvCell('say "hi"')).toBe('"say ""hi"""');
		expect(csvCell('"a", b')).toBe('"""a"", b"');
		expect(csvCell('line 1\nline 2')).toBe('"line 1\nline 2"');
	});

	it('writes objects as JSON and dates as ISO instants', () => {
		expect(csvCell({ code: 'L1', n: 2 })).toBe('"{""code"":""L1"",""n"":2}"');
		expect(csvCell(new Date(Date.UTC(2026, 0, 2, 3, 4, 5)))).toBe('2026-01-02T03:04:05.000Z');
	});
});

describe('csvRow', () => {
	it('joins cells with commas and ends with CRLF', () => {
		expect(csvRow(['a', 1, null, '=x'])).toBe("a,1,,'=x\r\n");
	});
});
