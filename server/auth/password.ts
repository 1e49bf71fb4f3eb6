import argon2 from 'argon2'

// argon2id with the library's defaults (64 MiB, 3 passes): slow enough to make stolen hashes
// expensive, about 50 ms per check here. https://github.com/ranisalt/node-argon2#options
export function hashPassword(plain: string): Promise<string> {
  return argon2.hash(plain, { type: argon2.argon2id })
}

export function verifyPassword(hash: string, plain: string): Promise<boolean> {
  return argon2.verify(hash, plain)
}

/**
 * A hash to verify against when the e-mail is unknown, so an unknown address costs the same
 * time as a wrong password and timing does not reveal who has an account.
 */
let decoy: Promise<string> | null = null
export function decoyHash(): Promise<string> {
  decoy ??= hashPassword('isentrope-decoy-password-not-used')
  return decoy
}
