/**
 * Type declarations for the parts of the `ml-regression` package (6.3, MIT) that the line fits
 * use. The package ships JavaScript only; these declarations describe its documented API and
 * nothing more.
 */
declare module 'ml-regression' {
  /** Ordinary least squares t = intercept + slope·x from the raw sums (no centring inside). */
  export class SimpleLinearRegression {
    constructor(x: ArrayLike<number>, y: ArrayLike<number>);
    readonly slope: number;
    readonly intercept: number;
  }

  export interface MultivariateLinearRegressionOptions {
    /** Add a column of ones (default true). */
    readonly intercept?: boolean;
    /** Compute standard errors and t statistics (default true). */
    readonly statistics?: boolean;
  }

  /** Least squares for several predictors through the normal equations solved by SVD. */
  export class MultivariateLinearRegression {
    constructor(x: number[][], y: number[][], options?: MultivariateLinearRegressionOptions);
    /** One row per predictor (then the intercept, when asked for), one column per response. */
    readonly weights: number[][];
  }
}
