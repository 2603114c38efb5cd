// Random secrets for links and API tokens, and the hash they are stored as. A 32-byte random value cannot be
// guessed, so a fast SHA-256 is enough to keep a leaked database copy from opening anything (no slow password
// hash needed); lookups compare hashes through the database's unique index.
import { createHash, randomBytes } from 'node:crypto'

export function newSecret(bytes = 32): string {
  return randomBytes(bytes).toString('base64url')
}

export function hashSecret(secret: string): string {
  return createHash('sha256').update(secret, 'utf8').digest('hex')
}
