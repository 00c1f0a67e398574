/**
 * The console's answer to a service's typed refusal: an {@link AccountsError} becomes the problem
 * type it names, and a full password-hashing queue a 503 'busy' with Retry-After. consoleRoute
 * applies this to whatever a handler throws, so handlers call services without wrapping them.
 */
import { AccountsError } from '../accounts/errors.js';
import { HashingBusyError } from '../accounts/passwords.js';
import { problem } from '../http/problem.js';

export function problemOfServiceError(err: unknown): unknown {
  if (err instanceof AccountsError) {
    return problem(err.kind, err.message, err.errors ? { errors: err.errors } : {});
  }
  if (err instanceof HashingBusyError) {
    return problem('busy', 'Too many password checks are in progress; try again in a moment.', {
      headers: { 'Retry-After': String(err.retryAfterSeconds) },
    });
  }
  return err;
}
