export type ScoringInputErrorCode =
  | 'stars-out-of-range'
  | 'count-invalid'
  | 'mean-out-of-range'
  | 'mean-missing'
  | 'histogram-invalid'
  | 'histogram-count-mismatch'
  | 'histogram-mean-mismatch'
  | 'empty-category'
  | 'date-invalid'
  | 'helpful-invalid'
  | 'reviewer-score-invalid'
  | 'settings-invalid'
  | 'duplicate-sku';

export class ScoringInputError extends Error {
  readonly code: ScoringInputErrorCode;
  readonly path: string;
  readonly reason: string;

  constructor(code: ScoringInputErrorCode, path: string, reason: string) {
    super(path ? `${path}: ${reason}` : reason);
    this.name = 'ScoringInputError';
    this.code = code;
    this.path = path;
    this.reason = reason;
  }
}
