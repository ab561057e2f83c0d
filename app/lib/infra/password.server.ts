import argon2 from "argon2";

// argon2id with the library's defaults (memory 64 MiB, 3 passes, 4 lanes: RFC 9106's second
// recommended option, scaled down in memory). argon2@0.44.0 is pinned (docs/stack-notes.md).
export function hashPassword(password: string): Promise<string> {
  return argon2.hash(password, { type: argon2.argon2id });
}

// A fixed hash to verify against when the e-mail is unknown, so an unknown account takes as
// long to refuse as a wrong password (no timing hint about which accounts exist).
let dummyHash: Promise<string> | undefined;

/** True when `password` matches `hash`; with `hash` null, spends the same time and says false. */
export async function verifyPassword(hash: string | null, password: string): Promise<boolean> {
  if (!hash) {
    dummyHash ??= hashPassword("twistlog-no-such-account");
    await argon2.verify(await dummyHash, password).catch(() => false);
    return false;
  }
  try {
    return await argon2.verify(hash, password);
  } catch {
    return false;
  }
}
