import { hash, verify } from '@node-rs/argon2';

// argon2id (the library's default algorithm) with OWASP's 19 MiB / 2 passes / 1 lane profile.
const OPTIONS = { memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

/** Hashes a password or PIN with argon2id. */
export function hashSecret(secret: string): Promise<string> {
	return hash(secret, OPTIONS);
}

let dummyHash: Promise<string> | null = null;

/**
 * Verifies a secret against a stored hash. With no hash (unknown account) it still spends the same
 * time on a dummy hash, so response timing does not reveal which accounts exist.
 */
export async function verifySecret(
	stored: string | null | undefined,
	secret: string
): Promise<boolean> {
	if (!stored) {
		dummyHash ??= hashSecret('padbridge-timing-equaliser');
		await verify(await dummyHash, secret).catch(() => false);
		return false;
	}
	try {
		return await verify(stored, secret);
	} catch {
		return false;
	}
}
