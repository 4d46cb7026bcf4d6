/**
 * The one error a domain function throws when a request cannot be done as asked: a conflict, a
 * state that does not allow it, a value the rules refuse. It carries what a person needs to put
 * it right (the field it belongs to and the reason in the shop's words), and the HTTP status the
 * edge answers with. `app/lib/domain-error.server.ts` turns it into a form's field errors or the
 * API's 4xx JSON; nothing else in a route needs to know the error's shape.
 *
 * Anything that is not a DomainError is a fault of ours and stays a 500 (logged).
 */
export type DomainIssue = { path: string; message: string };

export type DomainErrorOptions = {
  /** 409 by default (a conflict with the state of things); 422 for a value the rules refuse; 404, 403… */
  status?: number;
  /** The form field the reason belongs to ("form" for the form as a whole). */
  field?: string;
  /** Several problems at once (e.g. each incomplete block), by path. */
  issues?: DomainIssue[];
  /** Extra members of the API's JSON (e.g. the current version on a conflict). */
  details?: Record<string, unknown>;
};

export class DomainError extends Error {
  readonly status: number;
  readonly field: string;
  readonly issues: DomainIssue[];
  readonly details: Record<string, unknown>;

  constructor(message: string, options: DomainErrorOptions = {}) {
    super(message);
    this.name = "DomainError";
    this.status = options.status ?? 409;
    this.field = options.field ?? "form";
    this.issues = options.issues ?? [];
    this.details = options.details ?? {};
  }
}
