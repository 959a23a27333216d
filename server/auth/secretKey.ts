import { createSecretKey, type KeyObject } from 'node:crypto'

const keys = new Map<string, KeyObject>()

/**
 * The signing secret as a key object. Given a plain string, jsonwebtoken first tries to read it
 * as a PEM public or private key and only falls back to a secret after that throws: a thrown
 * error on every request, which was the largest cost of saving an answer.
 */
export function secretKey(secret: string): KeyObject {
  let key = keys.get(secret)
  if (!key) {
    key = createSecretKey(Buffer.from(secret, 'utf8'))
    keys.set(secret, key)
  }
  return key
}
