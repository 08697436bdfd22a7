/**
 * Input errors of the fitting functions (observations, statistics, calibration), with a code a
 * caller can test and words that name the item. Thrown only for arguments a caller could
 * have checked (an unknown parameter, a parameter without a range); a failed model run is
 * not thrown but reported in the result.
 */
export type FitErrorCode =
  | 'unknown_parameter'
  | 'parameter_without_range'
  | 'invalid_range'
  | 'unknown_variable'
  | 'no_observations'
  | 'no_parameters'
  | 'invalid_weight'
  | 'invalid_settings';

export class FitInputError extends Error {
  constructor(
    readonly code: FitErrorCode,
    message: string,
    readonly id?: string
  ) {
    super(message);
    this.name = 'FitInputError';
  }
}
