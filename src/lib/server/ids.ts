import { generateIdFromEntropySize } from 'lucia';

/** A new random id (80 bits, 16 lowercase base32 characters) for users, workspaces and other rows. */
export function newId(): string {
  return generateIdFromEntropySize(10);
}
