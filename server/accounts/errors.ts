/**
 * The typed refusals of the account services (users, sessions, credentials). A service throws
 * {@link AccountsError}; the console layer turns it into a problem-details answer whose type is
 * `kind` (server/console/service-errors.ts), so the services need no HTTP module.
 */

/** One offending input, named by the field of the service's input (e.g. `accountIds[1]`). */
export interface AccountsFieldError {
  field: string;
  message: string;
  value?: unknown;
}

/** The problem types these services refuse with (each is a slug of the problem catalogue). */
export type AccountsErrorKind = 'not-found' | 'conflict' | 'validation-failed';

export class AccountsError extends Error {
  override readonly name = 'AccountsError';
  readonly kind: AccountsErrorKind;
  readonly errors: AccountsFieldError[] | undefined;

  constructor(kind: AccountsErrorKind, detail: string, errors?: AccountsFieldError[]) {
    super(detail);
    this.kind = kind;
    this.errors = errors;
  }
}
