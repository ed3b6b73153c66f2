/** The caution every report carries: mapping errors can hurt patients. */
export const CAUTION =
  'These findings are decision support for qualified terminology reviewers, not decisions. ' +
  'Local terminology governance and licensed clinical practice decide every change to a mapping.';
