// Hostile and unusual input for the malformed-input sweep (tests/integration/security-malformed.test.ts):
// text values to put in one field of an otherwise valid submission, raw bodies that are not valid
// UTF-8, JSON values of the wrong type, and valid-but-unusual text that must be stored exactly.

export interface TextPayload {
	name: string;
	value: string;
}

/** Text that no field of Padbridge should accept: each must be refused with a field error. */
export const HOSTILE_TEXT: TextPayload[] = [
	{ name: '1 MB string', value: 'A'.repeat(1024 * 1024) },
	{ name: '1 MB of multi-byte text', value: 'ị'.repeat(512 * 1024) },
	{ name: 'NUL byte', value: 'before\u0000after' },
	{ name: 'only NUL', value: '\u0000' },
	{ name: 'RTL override', value: 'abc\u202Egpj.exe' },
	{ name: 'zero-width joiner and space', value: 'ab\u200B\u200Dcd' },
	{ name: 'lone surrogate (escaped)', value: 'x\uD800y' },
	{ name: 'impossible date 2026-02-30', value: '2026-02-30' },
	{ name: 'impossible date 2026-13-01', value: '2026-13-01' },
	{ name: 'date 0000-00-00', value: '0000-00-00' },
	{ name: 'date 99999-01-01', value: '99999-01-01' },
	{ name: '1e309', value: '1e309' },
	{ name: '20-digit number', value: '99999999999999999999' },
	{ name: '-0', value: '-0' },
	{ name: 'NaN', value: 'NaN' },
	{ name: 'Infinity', value: 'Infinity' },
	{ name: 'SQL metacharacters', value: "1' OR '1'='1'; --" },
	{ name: 'template syntax', value: '{{constructor.constructor("x")()}}' }
];

/** Dates that do not exist (or are out of any sensible range) for date fields. */
export const IMPOSSIBLE_DATES = [
	'2026-02-30',
	'2026-13-01',
	'0000-00-00',
	'99999-01-01',
	'2026-1-1'
];

/** Numbers no numeric field takes. */
export const HOSTILE_NUMBERS = [
	'1e309',
	'99999999999999999999',
	'-0',
	'NaN',
	'Infinity',
	'-1',
	'1.5',
	// Read loosely (parseInt) these would become 1, 10 and 0.
	'1e1',
	'10 years',
	'0x10'
];

/**
 * Byte sequences that are not UTF-8: a lone continuation byte, an overlong encoding, a truncated
 * sequence, a UTF-16 surrogate encoded as UTF-8, and bytes that never occur in UTF-8.
 */
export const INVALID_UTF8: { name: string; bytes: number[] }[] = [
	{ name: 'lone continuation byte 0x80', bytes: [0x61, 0x80, 0x62] },
	{ name: 'overlong slash C0 AF', bytes: [0xc0, 0xaf] },
	{ name: 'truncated 3-byte sequence', bytes: [0xe1, 0xbb] },
	{ name: 'encoded surrogate ED A0 80', bytes: [0xed, 0xa0, 0x80] },
	{ name: 'bytes FE FF', bytes: [0xfe, 0xff] }
];

/** A urlencoded body of `fields` with one field's value as raw bytes (not percent-encoded). */
export function urlencodedWithRawBytes(
	fields: Record<string, string>,
	field: string,
	bytes: number[]
): Uint8Array {
	const parts: Uint8Array[] = [];
	const enc = new TextEncoder();
	const entries = Object.entries(fields).filter(([k]) => k !== field);
	entries.forEach(([k, v], i) => {
		if (i) parts.push(enc.encode('&'));
		parts.push(enc.encode(`${encodeURIComponent(k)}=${encodeURIComponent(v)}`));
	});
	parts.push(enc.encode(`${entries.length ? '&' : ''}${encodeURIComponent(field)}=`));
	parts.push(Uint8Array.from(bytes));
	return concat(parts);
}

/** The same, with the bad bytes percent-encoded (`%C0%AF`), as a careless client might send them. */
export function urlencodedWithEscapedBytes(
	fields: Record<string, string>,
	field: string,
	bytes: number[]
): string {
	const escaped = bytes.map((b) => `%${b.toString(16).toUpperCase().padStart(2, '0')}`).join('');
	const rest = Object.entries(fields)
		.filter(([k]) => k !== field)
		.map(([k, v]) => `${encodeURIComponent(k)}=${encodeURIComponent(v)}`);
	return [...rest, `${encodeURIComponent(field)}=${escaped}`].join('&');
}

/** A JSON body of `value` with the string `"@@BYTES@@"` replaced by raw bytes inside the string. */
export function jsonWithRawBytes(value: unknown, bytes: number[]): Uint8Array {
	const text = JSON.stringify(value);
	const at = text.indexOf('@@BYTES@@');
	if (at < 0) throw new Error('jsonWithRawBytes: put "@@BYTES@@" in one string of the value');
	const enc = new TextEncoder();
	return concat([
		enc.encode(text.slice(0, at)),
		Uint8Array.from(bytes),
		enc.encode(text.slice(at + '@@BYTES@@'.length))
	]);
}

function concat(parts: Uint8Array[]): Uint8Array {
	const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
	let at = 0;
	for (const p of parts) {
		out.set(p, at);
		at += p.length;
	}
	return out;
}

/** Values of the wrong JSON type for a field that expects a string or a number. */
export const WRONG_JSON_TYPES: { name: string; value: unknown }[] = [
	{ name: 'array', value: ['a', 'b'] },
	{ name: 'object', value: { nested: true } },
	{ name: 'null', value: null },
	{ name: 'boolean', value: true },
	{ name: 'huge number', value: 1e308 * 10 },
	{ name: 'negative zero', value: -0 }
];

/** JSON nested deeper than any endpoint reads (a parser bomb for recursive validators). */
export function deeplyNested(depth = 10_000): string {
	return '['.repeat(depth) + ']'.repeat(depth);
}

/** Whole bodies that are not what a JSON endpoint takes. */
export const BAD_JSON_BODIES: { name: string; body: string; type: string }[] = [
	{ name: 'empty body', body: '', type: 'application/json' },
	{ name: 'not JSON', body: '{"a":', type: 'application/json' },
	{ name: 'JSON array', body: '[1,2,3]', type: 'application/json' },
	{ name: 'JSON null', body: 'null', type: 'application/json' },
	{ name: 'JSON string', body: '"text"', type: 'application/json' },
	{ name: 'deeply nested', body: deeplyNested(), type: 'application/json' },
	{ name: 'wrong content type (text/plain)', body: '{}', type: 'text/plain' },
	{
		name: 'wrong content type (urlencoded)',
		body: 'a=1',
		type: 'application/x-www-form-urlencoded'
	}
];

/** Valid but unusual text: each must be accepted and stored byte for byte. */
export const UNUSUAL_TEXT: TextPayload[] = [
	{ name: 'Vietnamese', value: 'Nguyễn Thị Ánh Tuyết — kiểm tra đầu ép' },
	{ name: 'Chinese', value: '张伟：更换缓冲片后复核温度' },
	{ name: 'Korean', value: '김민준 압착 헤드 점검' },
	{ name: 'Arabic (RTL)', value: 'فحص رأس الضغط بعد التبريد' },
	{ name: 'Hebrew (RTL) with digits', value: 'בדיקה 186 מעלות' },
	{ name: 'emoji and astral', value: 'Buffer sheet ✅ 🔥 𝐀𝐂𝐅 👩🏽‍🔧' },
	{ name: 'combining marks', value: 'Cafe\u0301 n\u0303' }
];
