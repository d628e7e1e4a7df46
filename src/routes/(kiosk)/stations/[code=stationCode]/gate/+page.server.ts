// The station kiosk: no user session; the terminal is authorised by the station gate key it was
// paired with (an httpOnly cookie on this path), checked again on every request.
import { error, fail, redirect } from '@sveltejs/kit';
import { recordAuditNow } from '$lib/server/audit';
import { config } from '$lib/server/config';
import { checkStationAccess, recordUnavailable, withTimeout } from '$lib/server/gate';
import {
	KIOSK_COOKIE,
	checkKioskKey,
	forgetKioskKey,
	kioskPath,
	stationTimeZone,
	storeKioskKey
} from '$lib/server/gate/kiosk';
import { listStationInstructions } from '$lib/server/instructions';
import { kioskPairSchema, kioskScanSchema } from '$lib/schemas/gate';
import { describeGateReason, describeGateWarning } from '$lib/gate/describe';
import { formatLocal } from '$lib/time';
import type { Actions, PageServerLoad } from './$types';

const kioskActor = (code: string, address: string | null) => ({
	id: null,
	label: `Station kiosk ${code}`,
	address
});

export const load: PageServerLoad = async ({ params, cookies, url, setHeaders }) => {
	setHeaders({ 'cache-control': 'no-store' });
	const key = cookies.get(KIOSK_COOKIE);
	let found;
	try {
		found = await withTimeout(listStationInstructions(params.code), config.gateTimeoutMs);
	} catch {
		return { code: params.code, state: 'unavailable' as const, notice: null };
	}
	if (!found) error(404, { message: 'No such station' });
	const station = { code: found.station.code, name: found.station.name };
	if (!key) return { station, state: 'unpaired' as const, notice: null };
	const check = await checkKioskKey(params.code, key);
	if (!check.ok) {
		if (check.reason === 'unavailable')
			return { station, state: 'unavailable' as const, notice: null };
		forgetKioskKey(cookies, url, params.code);
		return {
			station,
			state: 'unpaired' as const,
			notice: `This terminal is no longer paired. ${check.message}`
		};
	}
	return {
		station,
		state: 'paired' as const,
		notice: null,
		keyPrefix: check.key.prefix,
		instructions: found.instructions.map((i) => ({
			docNumber: i.docNumber,
			letter: i.letter,
			title: i.title
		}))
	};
};

export const actions: Actions = {
	pair: async ({ params, request, cookies, url, getClientAddress }) => {
		const parsed = kioskPairSchema.safeParse(Object.fromEntries(await request.formData()));
		if (!parsed.success) {
			return fail(400, { pair: { error: parsed.error.issues[0].message } });
		}
		const check = await checkKioskKey(params.code, parsed.data.key);
		if (!check.ok) {
			const status =
				check.reason === 'unknown_station'
					? 404
					: check.reason === 'other_station'
						? 403
						: check.reason === 'unavailable'
							? 503
							: 400;
			return fail(status, { pair: { error: check.message } });
		}
		storeKioskKey(cookies, url, params.code, parsed.data.key);
		await recordAuditNow(kioskActor(params.code, getClientAddress()), {
			action: 'kiosk.paired',
			entityType: 'station',
			entityId: check.station.id,
			newValues: { station: check.station.code, apiKeyId: check.key.id, prefix: check.key.prefix }
		});
		redirect(303, kioskPath(params.code));
	},
	unpair: async ({ params, cookies, url }) => {
		forgetKioskKey(cookies, url, params.code);
		redirect(303, kioskPath(params.code));
	},
	check: async ({ params, request, cookies, url }) => {
		const key = cookies.get(KIOSK_COOKIE);
		const parsed = kioskScanSchema.safeParse(Object.fromEntries(await request.formData()));
		const paired = key ? await checkKioskKey(params.code, key) : null;
		if (paired?.ok === false && paired.reason === 'unavailable') {
			if (parsed.success)
				recordUnavailable({ station: params.code, badge: parsed.data.badge, source: 'kiosk' });
			return {
				result: {
					id: `unavailable-${Date.now()}`,
					decision: 'deny' as const,
					person: null,
					reasons: [describeGateReason({ code: 'unavailable' }, config.plantTimeZone)],
					warnings: [],
					validUntil: null
				}
			};
		}
		if (!paired?.ok) {
			if (key) forgetKioskKey(cookies, url, params.code);
			return fail(401, {
				scan: { error: 'This terminal is not paired. Pair it with the station’s gate key.' }
			});
		}
		if (!parsed.success) return fail(400, { scan: { error: parsed.error.issues[0].message } });
		const answer = await checkStationAccess({
			station: params.code,
			badge: parsed.data.badge,
			source: 'kiosk',
			apiKeyId: paired.key.id
		});
		const zone = await stationTimeZone(paired.station.id).catch(() => config.plantTimeZone);
		const now = answer.checkedAt;
		return {
			result: {
				id: `${answer.logId ?? 'x'}-${now.getTime()}`,
				decision: answer.decision,
				person: answer.person?.name ?? null,
				reasons: answer.reasons.map((r) => describeGateReason(r, zone, now)),
				warnings: answer.warnings.map((w) => describeGateWarning(w, zone, now)),
				validUntil: answer.validUntil ? formatLocal(answer.validUntil, zone) : null
			}
		};
	}
};
