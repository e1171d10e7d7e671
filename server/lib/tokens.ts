import { createHash } from 'node:crypto'

/** SHA-256 (hex) of a secret token or address: what is stored or used as a key instead of the value itself. */
export const hashToken = (token: string) => createHash('sha256').update(token, 'utf8').digest('hex')
