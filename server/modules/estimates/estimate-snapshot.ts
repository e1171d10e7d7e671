import { createHash } from 'node:crypto'
import canonicalize from 'canonicalize'
import type { EstimateSnapshot } from '../../../shared/schemas/estimates'

/**
 * The version hash: SHA-256 over the RFC 8785 (JSON Canonicalization Scheme) form of the snapshot,
 * so key order and number spelling cannot change it; any change of content or price does.
 */
export function snapshotHash(snapshot: EstimateSnapshot): string {
  const canonical = canonicalize(snapshot)
  if (canonical === undefined) throw new Error('snapshot cannot be canonicalised')
  return createHash('sha256').update(canonical, 'utf8').digest('hex')
}
