/**
 * Errors thrown by the sandbox, shaped like OfficeExtension.Error (name "RichApi.Error", `code`,
 * `message`, `debugInfo`, `traceMessages`, `innerError`), so code that inspects `error.code`
 * behaves the same against the sandbox and against Excel.
 *
 * Codes used (all values of Excel.ErrorCodes / OfficeExtension.ErrorCodes):
 *  PropertyNotLoaded, InvalidArgument, ItemNotFound, ItemAlreadyExists, AccessDenied,
 *  RequestPayloadSizeLimitExceeded, ResponsePayloadSizeLimitExceeded, InvalidReference,
 *  InvalidOperation, InvalidSelection, GeneralException, InvalidObjectPath, NotImplemented.
 * "NotImplemented" marks a member the sandbox deliberately does not model (Excel would accept it).
 */

export type SandboxErrorCode =
  | 'PropertyNotLoaded'
  | 'ValueNotLoaded'
  | 'InvalidArgument'
  | 'ItemNotFound'
  | 'ItemAlreadyExists'
  | 'AccessDenied'
  | 'RequestPayloadSizeLimitExceeded'
  | 'ResponsePayloadSizeLimitExceeded'
  | 'InvalidReference'
  | 'InvalidOperation'
  | 'InvalidSelection'
  | 'NonBlankCellOffSheet'
  | 'GeneralException'
  | 'InvalidObjectPath'
  | 'NotImplemented'
  | 'InvalidRequestContext'
  | 'InvalidOperationInCellEditMode';

export interface SandboxDebugInfo {
  readonly code: string;
  readonly message: string;
  /** e.g. "Range.values" or "WorksheetCollection.getItem". */
  readonly errorLocation?: string;
  /** The failing queued statement, in a readable form. */
  readonly statement?: string;
  readonly surroundingStatements?: string[];
  readonly fullStatements?: string[];
  readonly innerError?: SandboxDebugInfo | string;
}

export class SandboxError extends Error {
  readonly code: SandboxErrorCode;
  readonly debugInfo: SandboxDebugInfo;
  readonly traceMessages: string[] = [];
  readonly innerError: SandboxError | null = null;

  constructor(code: SandboxErrorCode, message: string, errorLocation?: string, statement?: string) {
    super(message);
    // Office.js errors are named "RichApi.Error" (OfficeExtension.Error.name).
    this.name = 'RichApi.Error';
    this.code = code;
    this.debugInfo = {
      code,
      message,
      ...(errorLocation !== undefined ? { errorLocation } : {}),
      ...(statement !== undefined ? { statement, surroundingStatements: [statement], fullStatements: [statement] } : {}),
    };
  }

  /** A copy of this error naming the statement that failed (used by sync()). */
  withStatement(statement: string): SandboxError {
    return new SandboxError(this.code, this.message, this.debugInfo.errorLocation, statement);
  }
}

export function isSandboxError(e: unknown): e is SandboxError {
  return e instanceof SandboxError;
}

export const fail = (code: SandboxErrorCode, message: string, location?: string): never => {
  throw new SandboxError(code, message, location);
};
