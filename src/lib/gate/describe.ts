// Gate reasons and warnings in plain words, for the kiosk and for refusals that quote the gate.
import type { GateReason, GateWarning } from './decide';
import { formatLocal } from '../time';

const REASON_WORDS: Record<GateReason['code'], string> = {
	unavailable: 'Padbridge cannot decide right now (database unavailable). Try again.',
	unknown_station: 'This station is not known to Padbridge.',
	station_inactive: 'This station is switched off in Padbridge.',
	unknown_badge: 'Badge not known. Check the badge or ask your line lead.',
	inactive_person: 'This badge belongs to an inactive person.',
	contract_ended: 'The contract has ended.',
	missing: 'no certificate',
	expired: 'certificate expired',
	suspended: 'certificate suspended',
	withdrawn: 'certificate withdrawn',
	retraining_overdue: 'retraining overdue (grace period over)',
	supervised: 'Supervised run'
};

/** "HH:MM" when the instant is today in the zone, otherwise the date as well. */
function shortLocal(iso: string, zone: string, now: Date) {
	const at = formatLocal(iso, zone, false);
	return at.slice(0, 10) === formatLocal(now, zone, false).slice(0, 10) ? at.slice(11) : at;
}

/** One reason in plain words, e.g. "COG-MB: certificate expired". */
export function describeGateReason(r: GateReason, zone: string, now: Date = new Date()): string {
	if (r.code === 'supervised') {
		const m = /^supervised by (.+) until (\S+)$/.exec(r.detail ?? '');
		return m
			? `Supervised run until ${shortLocal(m[2], zone, now)} by ${m[1]}`
			: REASON_WORDS.supervised;
	}
	if (r.code === 'contract_ended' && r.detail) return `The contract ended on ${r.detail}.`;
	const words = REASON_WORDS[r.code] ?? r.code;
	return r.process ? `${r.process}: ${words}` : words;
}

const DAY = 86_400_000;

/** One warning in plain words, e.g. "COG-MB: certificate expires in 12 days (2026-08-01)". */
export function describeGateWarning(w: GateWarning, zone: string, now: Date = new Date()): string {
	const prefix = w.process ? `${w.process}: ` : '';
	const until = w.until ? new Date(w.until) : null;
	if (w.code === 'expiring' && until) {
		const days = Math.max(0, Math.ceil((until.getTime() - now.getTime()) / DAY));
		const lastDay = formatLocal(new Date(until.getTime() - 1), zone, false).slice(0, 10);
		return `${prefix}certificate expires in ${days} day${days === 1 ? '' : 's'} (valid through ${lastDay})`;
	}
	if (w.code === 'retraining_due')
		return `${prefix}retraining due; grace until ${until ? formatLocal(until, zone, false) : 'the rule’s grace end'}`;
	if (w.code === 'contract_ending') return 'The contract ends today.';
	return `${prefix}${w.code}`;
}
