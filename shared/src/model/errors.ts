/**
 * Errors of the scoring-model engine. Each carries a stable `code` so callers
 * (CLI, server, workers) can map it to an exit code or an HTTP status without
 * parsing the message.
 */

export type ModelErrorCode =
  | 'bad-options'
  | 'bad-data'
  | 'one-class'
  | 'no-candidate'
  | 'no-edge'
  | 'overflow'
  | 'bad-model-file'
  | 'bad-row';

export class ModelError extends Error {
  readonly code: ModelErrorCode;
  constructor(code: ModelErrorCode, message: string, options?: { cause?: unknown }) {
    super(message, options);
    this.name = 'ModelError';
    this.code = code;
  }
}

/** Training options failed their schema; `issues` lists each path and message. */
export class OptionsError extends ModelError {
  readonly issues: { path: string; message: string }[];
  constructor(message: string, issues: { path: string; message: string }[]) {
    super('bad-options', message);
    this.name = 'OptionsError';
    this.issues = issues;
  }
}

/** Training could not start or had to stop (one class only, no stump beats chance, overflow, bad columns). */
export class TrainingError extends ModelError {
  constructor(code: ModelErrorCode, message: string) {
    super(code, message);
    this.name = 'TrainingError';
  }
}

/** A model file that is not JSON, not ours, of an unknown version, or internally inconsistent. */
export class ModelFormatError extends ModelError {
  constructor(message: string, options?: { cause?: unknown }) {
    super('bad-model-file', message, options);
    this.name = 'ModelFormatError';
  }
}

/** A row to score holds a value the model cannot read (e.g. text in a numeric feature). */
export class ScoringInputError extends ModelError {
  constructor(message: string) {
    super('bad-row', message);
    this.name = 'ScoringInputError';
  }
}
