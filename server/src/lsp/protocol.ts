// pnlint's own protocol additions, shared with the extension (which declares the same names).

/** Request: the operating-point report of a file, as `pnlint op` prints it. */
export const OPERATING_POINT_REQUEST = 'pnlint/operatingPoint';
export interface OperatingPointParams {
  uri: string;
}
/** Plain text, as `pnlint op` prints it. */
export type OperatingPointResult = string;

/** Notification after each publish of a document's diagnostics, for the status bar. */
export const STATUS_NOTIFICATION = 'pnlint/status';
export interface StatusParams {
  uri: string;
  /** The document version the counts are for. */
  version: number;
  errors: number;
  warnings: number;
  /** How long the analysis took. */
  milliseconds: number;
}

/** What the client may send in `initializationOptions`. */
export interface InitializationOptions {
  /** True in an untrusted workspace: no include outside the workspace folders is read. */
  restricted?: boolean;
  /** The `pnlint` settings section, for clients that do not answer `workspace/configuration`. */
  settings?: Record<string, unknown>;
}
