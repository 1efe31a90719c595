// Leadline's own error type: everything a user can act on. Never shown with a stack trace.
import { visible } from './text/index.js';

export interface Where {
  file?: string | null;
  line?: number | null;
  column?: number | null;
  keyPath?: string | null;
}

export type ErrorKind = 'config' | 'data' | 'usage';

export class LeadlineError extends Error {
  readonly kind: ErrorKind;
  readonly file: string | null;
  readonly line: number | null;
  readonly column: number | null;
  readonly keyPath: string | null;

  constructor(kind: ErrorKind, message: string, where: Where = {}) {
    super(message);
    this.name = 'LeadlineError';
    this.kind = kind;
    this.file = where.file ?? null;
    this.line = where.line ?? null;
    this.column = where.column ?? null;
    this.keyPath = where.keyPath ?? null;
  }

  /** "file:line:column: message" (or "file: key path: message"), the form editors recognise. */
  describe(): string {
    const place = [this.file, this.line, this.column].filter((p) => p !== null && p !== undefined).join(':');
    const key = this.keyPath ? `${this.keyPath}: ` : '';
    // Untrusted pieces (file names, cells) are shown with invisible characters escaped.
    return visible(place ? `${place}: ${key}${this.message}` : `${key}${this.message}`, true);
  }
}

export function isLeadlineError(e: unknown): e is LeadlineError {
  return e instanceof LeadlineError;
}
