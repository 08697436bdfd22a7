import type { Problem } from '../document/types';
import { formatProblem } from '../document/problems';

/** Thrown by compileModel for a model that has errors; carries every problem. */
export class ModelInvalidError extends Error {
  readonly code = 'invalid_model';
  constructor(readonly problems: Problem[]) {
    super(
      `the model has ${problems.filter((p) => p.severity === 'error').length} error(s):\n` +
        problems.filter((p) => p.severity === 'error').map((p) => formatProblem(p)).join('\n')
    );
    this.name = 'ModelInvalidError';
  }
}
