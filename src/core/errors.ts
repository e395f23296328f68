/**
 * Typed errors. Every failure a user can cause carries a code and an exit
 * code, and a one-line message that names the offending key or file and what
 * would be valid. The CLI prints `message` only (never a stack trace unless
 * asked for with --debug).
 */

/** Error codes used across psibox. */
export type ErrorCode =
  | "config" // a bad key or value in a config file or override
  | "input" // a bad file or argument
  | "numerics" // a run stopped by a guard rail (non-finite field, mass drift)
  | "io" // a file could not be read or written
  | "thread"; // a worker thread of the step failed, exited or stopped answering

/** Base error of psibox: a code, an exit status and a one-line message. */
export class PsiboxError extends Error {
  readonly code: ErrorCode;
  readonly exitCode: number;
  constructor(code: ErrorCode, message: string, exitCode: number) {
    super(message);
    this.name = "PsiboxError";
    this.code = code;
    this.exitCode = exitCode;
  }
}

/** A bad configuration value. Exit code 2. `key` is the dotted config path. */
export class ConfigError extends PsiboxError {
  readonly key: string;
  constructor(key: string, message: string) {
    super("config", key ? `${key}: ${message}` : message, 2);
    this.name = "ConfigError";
    this.key = key;
  }
}

/** A bad command-line argument or input file. Exit code 2. */
export class InputError extends PsiboxError {
  constructor(message: string) {
    super("input", message, 2);
    this.name = "InputError";
  }
}

/** A run stopped by a numerical guard rail. Exit code 3. */
export class NumericsError extends PsiboxError {
  constructor(message: string) {
    super("numerics", message, 3);
    this.name = "NumericsError";
  }
}

/** A worker thread of the step failed, exited or stopped answering. Exit code 1. */
export class ThreadError extends PsiboxError {
  constructor(message: string) {
    super("thread", message.replace(/\s*\n\s*/g, " ").trim(), 1);
    this.name = "ThreadError";
  }
}

/** A file could not be written (full disk, quota, size limit, permissions). Exit code 2; a run turns it into a stop (exit 3). */
export class WriteError extends PsiboxError {
  readonly file: string;
  constructor(file: string, message: string) {
    super("io", message, 2);
    this.name = "WriteError";
    this.file = file;
  }
}
