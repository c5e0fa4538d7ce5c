import { createHash, randomBytes } from "node:crypto";
import { createRequire } from "node:module";
import { hash, verify } from "@node-rs/argon2";
import { AppError } from "../core/app-error.ts";

const require = createRequire(import.meta.url);
const commonPasswords = require("fxa-common-password-list") as { test(p: string): boolean };

// OWASP's password storage cheat sheet lists argon2id with m=19 MiB, t=2, p=1 as a minimum.
// algorithm 2 = Argon2id (the package's const enum cannot be read under isolatedModules).
const OPTIONS = { algorithm: 2 as const, memoryCost: 19_456, timeCost: 2, parallelism: 1 };

export const hashPassword = (password: string) => hash(password, OPTIONS);

export async function verifyPassword(passwordHash: string, password: string): Promise<boolean> {
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

let dummy: Promise<string> | undefined;
/** Spends the same time as a real check, so an unknown address answers like a wrong password. */
export async function burnVerify(password: string): Promise<false> {
  dummy ??= hashPassword(randomBytes(16).toString("hex"));
  await verifyPassword(await dummy, password);
  return false;
}

/** Refuses passwords found on a list of common ones (the length rule is in the schema). */
export function assertPasswordAcceptable(password: string, email?: string): void {
  const lower = password.toLowerCase();
  const local = email?.split("@")[0]?.toLowerCase();
  if (commonPasswords.test(password) || commonPasswords.test(lower) || (local && local.length >= 4 && lower.includes(local))) {
    throw new AppError("validation", "Choose a less common password.", 400, {
      password: "is too common or too close to your e-mail address; choose another",
    });
  }
}

export const newToken = () => randomBytes(32).toString("base64url");
export const hashToken = (token: string) => createHash("sha256").update(token).digest("hex");
