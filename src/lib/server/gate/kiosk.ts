// The station kiosk: a terminal paired with one station's gate API key answers badge scans with
// the gate's decision. The key sits in an httpOnly cookie scoped to the kiosk's path and is
// checked on every request, so revoking or rotating the key unpairs the terminal at once.
import type { Cookies } from '@sveltejs/kit';
import { eq } from 'drizzle-orm';
import { verifyApiKey, type VerifiedApiKey } from '../apikeys';
import { config } from '../config';
import { db } from '../db';
import { lines, sites, stations } from '../db/schema';
import { findStationByCode, withTimeout } from './index';

export const KIOSK_COOKIE = 'pb_kiosk_key';
const KIOSK_COOKIE_MAX_AGE_S = 400 * 86_400; // browsers cap cookie lifetime near 400 days

export const kioskPath = (code: string) => `/stations/${code}/gate`;

export type KioskKeyCheck =
	| { ok: true; key: VerifiedApiKey; station: { id: number; code: string } }
	| {
			ok: false;
			reason: 'invalid' | 'other_station' | 'unbound' | 'unknown_station';
			message: string;
	  }
	| { ok: false; reason: 'unavailable'; message: string };

/**
 * Whether `key` is a live gate key bound to station `code`. Never throws: a database that does not
 * answer in time is `unavailable`, which the kiosk shows as a deny.
 */
export async function checkKioskKey(code: string, key: string): Promise<KioskKeyCheck> {
	try {
		const [verified, station] = await Promise.all([
			withTimeout(verifyApiKey(`Bearer ${key}`, 'gate'), config.gateTimeoutMs),
			findStationByCode(code)
		]);
		if (!station)
			return { ok: false, reason: 'unknown_station', message: `There is no station ${code}.` };
		if (!verified)
			return {
				ok: false,
				reason: 'invalid',
				message:
					'This is not a live station gate key: it may be mistyped, revoked, rotated, or made for another purpose.'
			};
		if (verified.stationId === null)
			return {
				ok: false,
				reason: 'unbound',
				message: `This gate key is not bound to a station. Pair ${code} with the key made for ${code}.`
			};
		if (verified.stationId !== station.id)
			return {
				ok: false,
				reason: 'other_station',
				message: `This key belongs to another station; it cannot pair ${code}. Use the key made for ${code}.`
			};
		return { ok: true, key: verified, station: { id: station.id, code: station.code } };
	} catch {
		return {
			ok: false,
			reason: 'unavailable',
			message: 'Padbridge could not reach its database in time.'
		};
	}
}

export function storeKioskKey(cookies: Cookies, url: URL, code: string, key: string) {
	cookies.set(KIOSK_COOKIE, key, {
		path: kioskPath(code),
		httpOnly: true,
		sameSite: 'strict',
		secure: url.protocol === 'https:',
		maxAge: KIOSK_COOKIE_MAX_AGE_S
	});
}

export function forgetKioskKey(cookies: Cookies, url: URL, code: string) {
	cookies.delete(KIOSK_COOKIE, {
		path: kioskPath(code),
		httpOnly: true,
		sameSite: 'strict',
		secure: url.protocol === 'https:'
	});
}

/** The time zone of the station's plant (for showing times at the kiosk). */
export async function stationTimeZone(stationId: number): Promise<string> {
	const [row] = await withTimeout(
		db
			.select({ zone: sites.timeZone })
			.from(stations)
			.innerJoin(lines, eq(lines.id, stations.lineId))
			.innerJoin(sites, eq(sites.id, lines.siteId))
			.where(eq(stations.id, stationId)),
		config.gateTimeoutMs
	);
	return row?.zone ?? config.plantTimeZone;
}
