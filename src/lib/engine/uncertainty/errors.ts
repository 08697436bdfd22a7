/**
 * Input errors of the uncertainty functions (sampling, Morris screening, ensembles), with a
 * code a caller can test and words that name the item. The engine never throws for a bad
 * run; these are thrown only for arguments a caller could have checked (sizes, ranges).
 */
export type UncertaintyErrorCode =
  | 'invalid_ensemble_size'
  | 'invalid_seed'
  | 'invalid_range'
  | 'nothing_to_sample'
  | 'invalid_morris_settings'
  | 'duplicate_scenario'
  | 'no_scenarios';

export class UncertaintyInputError extends Error {
  constructor(
    readonly code: UncertaintyErrorCode,
    message: string,
    readonly id?: string
  ) {
    super(message);
    this.name = 'UncertaintyInputError';
  }
}
