// Error kinds that the command line maps to exit codes: input mistakes exit 2,
// a run that stopped early (divergence, singular system during a run) exits 3.

/** A mistake in the user's input: one sentence naming the field, what was expected, the unit and what was found. */
export class InputError extends Error {
  override name = 'InputError';
  constructor(message: string) {
    super(message);
  }
}

/** The linear system has no unique solution (zero or negative-definite pivot at the given equation). */
export class SingularMatrixError extends Error {
  override name = 'SingularMatrixError';
  constructor(message: string, readonly equation: number) {
    super(message);
  }
}

/** A run that cannot go on (divergence after all retries, NaN): everything written so far is kept. */
export class RunStopped extends Error {
  override name = 'RunStopped';
  constructor(message: string) {
    super(message);
  }
}

/** The disk filled up (or a quota was reached) while rupta wrote a file: what was written before is kept. */
export class DiskFull extends Error {
  override name = 'DiskFull';
  constructor(readonly path: string, message?: string) {
    super(message ?? `the disk is full: no space was left to write ${path}`);
  }
}
