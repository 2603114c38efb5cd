// Password hashing: argon2id at the OWASP Password Storage Cheat Sheet's first parameter set
// (m = 19456 KiB, t = 2, p = 1). Stored hashes start with $argon2id$v=19$m=19456,t=2,p=1$.
import { hash, verify } from '@node-rs/argon2'

// 2 is Algorithm.Argon2id (a const enum in the package's types, which isolated-module builds cannot read).
const ARGON2_OPTIONS = { algorithm: 2 as const, memoryCost: 19456, timeCost: 2, parallelism: 1, outputLen: 32 }

export function hashPassword(password: string): Promise<string> {
  return hash(password, ARGON2_OPTIONS)
}

export async function verifyPassword(storedHash: string, password: string): Promise<boolean> {
  try {
    return await verify(storedHash, password)
  } catch {
    // A malformed stored hash must never let anyone in.
    return false
  }
}
