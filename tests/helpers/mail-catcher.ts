// The SMTP catcher of scripts/fakes.js, read through its HTTP API: what the mail server really got.
const CATCHER = () => {
	const url = process.env.MAIL_CATCHER_URL;
	if (!url) throw new Error('MAIL_CATCHER_URL is not set; run the tests through `npm test`');
	return url;
};

export interface CaughtMail {
	id: string;
	envelopeTo: string[];
	messageId: string | null;
	subject: string;
	to: string;
	text: string;
	html: string;
	headers: Record<string, string>;
}

export async function caughtMail(): Promise<CaughtMail[]> {
	const res = await fetch(`${CATCHER()}/api/messages`);
	if (!res.ok) throw new Error(`catcher answered ${res.status}`);
	return (await res.json()) as CaughtMail[];
}

/** Messages the catcher holds for one address. */
export async function caughtFor(address: string): Promise<CaughtMail[]> {
	return (await caughtMail()).filter((m) => m.envelopeTo.includes(address));
}

/** Makes the catcher refuse (down) or accept (up) SMTP connections. */
export async function smtpSwitch(state: 'down' | 'up'): Promise<void> {
	const res = await fetch(`${CATCHER()}/api/smtp/${state}`, { method: 'POST' });
	if (res.status !== 204) throw new Error(`catcher answered ${res.status}`);
}
