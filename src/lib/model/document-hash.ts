import { sha256 } from '@noble/hashes/sha2';
import { bytesToHex, utf8ToBytes } from '@noble/hashes/utils';
import { canonicalJson } from './canonical-json';

/**
 * Content hash of a model document: lower-case hex SHA-256 (FIPS 180-4) of its canonical JSON.
 * Hash the validated document (defaults applied) so that writing a default explicitly or leaving it
 * out gives the same hash. Pure JS (@noble/hashes): runs in workers, the CLI and the browser.
 */
export function documentHash(document: unknown): string {
  return bytesToHex(sha256(utf8ToBytes(canonicalJson(document))));
}
