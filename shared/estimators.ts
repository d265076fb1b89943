/** The methods that compute motion fields (DESIGN §2), chosen per project. */
export const ESTIMATORS = ['farneback', 'horn-schunck', 'lucas-kanade', 'dis'] as const;
export type EstimatorName = (typeof ESTIMATORS)[number];

export const DEFAULT_ESTIMATOR: EstimatorName = 'dis';
