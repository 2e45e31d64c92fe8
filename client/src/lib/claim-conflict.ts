import type { ClaimConflict, PersonRef } from '@shared/api/cases';
import { isApiError } from './api-client';

/**
 * Who holds a case, when `error` is the claim endpoint's 409: the person, or
 * null when the server did not say. Undefined for any other error.
 */
export function claimConflictHolder(error: unknown): PersonRef | null | undefined {
  if (!isApiError(error) || error.status !== 409 || error.code !== 'already_claimed') return undefined;
  const holder = error.details?.claimedBy as ClaimConflict['error']['claimedBy'] | undefined;
  return holder && typeof holder.displayName === 'string' ? holder : null;
}

/** "Already claimed by Noor Vance", or without the name when the server gave none. */
export function claimConflictMessage(holder: PersonRef | null): string {
  return holder ? `Already claimed by ${holder.displayName}` : 'Already claimed by someone else';
}
