//! The crate's one error type: only bad input (or an exhausted effort budget)
//! is an [`Error`]. Mathematical outcomes — "insoluble at 3", "no point up to
//! height H", "rank between 1 and 3" — are ordinary return values.

use num_bigint::BigInt;

/// Everything that can go wrong because of what a caller passed in, or
/// because a caller-set effort budget ran out.
///
/// Each variant carries the offending value so the message says what is wrong.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
#[non_exhaustive]
pub enum Error {
    /// A rational number was given with denominator zero.
    #[error("zero denominator in {context}")]
    ZeroDenominator {
        /// Where the zero denominator appeared.
        context: String,
    },
    /// An argument that must be nonzero was zero.
    #[error("{what} must be nonzero")]
    Zero {
        /// Which argument was zero.
        what: String,
    },
    /// An argument that must be a positive integer was not.
    #[error("{what} must be positive, got {value}")]
    NotPositive {
        /// Which argument.
        what: String,
        /// The value passed.
        value: BigInt,
    },
    /// An argument that must be prime was not.
    #[error("{value} is not a prime")]
    NotPrime {
        /// The value passed.
        value: BigInt,
    },
    /// Text that should describe a curve (or another object) did not parse.
    #[error("cannot parse {input:?}: {reason}")]
    Parse {
        /// The text as given.
        input: String,
        /// What is wrong with it.
        reason: String,
    },
    /// The Weierstrass model has discriminant zero.
    #[error("singular Weierstrass model: {reason}")]
    SingularCurve {
        /// Why the model is singular (for example "discriminant is 0").
        reason: String,
    },
    /// The curve has no rational point of order 2, so descent via
    /// 2-isogeny does not apply.
    #[error("the curve has no rational point of order 2")]
    NoTwoTorsion,
    /// No rational isogeny that this crate's descents handle: descent via
    /// 3-isogeny needs j = 0 (y² = x³ + k); the reason says whether the
    /// curve has a rational 3-isogeny (the case α ≠ 0 of
    /// y² = x³ + D(αx + β)², not covered yet) or none.
    #[error("no supported isogeny: {reason}")]
    NoSupportedIsogeny {
        /// What the curve lacks.
        reason: String,
    },
    /// A point passed in does not lie on the curve it was given with.
    #[error("point {point} is not on the curve {curve}")]
    PointNotOnCurve {
        /// The point, as text.
        point: String,
        /// The curve, as text.
        curve: String,
    },
    /// A binary form or quartic that must be non-degenerate was degenerate.
    #[error("degenerate form: {reason}")]
    Degenerate {
        /// What is degenerate about it.
        reason: String,
    },
    /// Factorisation stopped because its effort budget ran out. The primes
    /// found so far and the cofactor left unfactored are handed back.
    #[error("factorisation budget exhausted; cofactor {cofactor} left unfactored")]
    FactorBudgetExhausted {
        /// Prime powers already split off, as (prime, exponent).
        found: Vec<(BigInt, u32)>,
        /// The composite (or not yet certified) part left over.
        cofactor: BigInt,
    },
    /// A computation stopped because its effort budget or deadline ran out.
    #[error("effort budget exhausted during {stage}")]
    BudgetExhausted {
        /// Which stage gave up.
        stage: String,
    },
    /// Reading or writing a file or stream failed.
    #[error("cannot {action} {target}: {reason}")]
    Io {
        /// What was being done, e.g. "read" or "write".
        action: String,
        /// The file or stream, as text.
        target: String,
        /// The operating system's message.
        reason: String,
    },
    /// An internal consistency check failed: a bug in this crate, never
    /// the caller's fault. The message names the check; please report the
    /// input.
    #[error("internal check failed: {check}")]
    Internal {
        /// The check that failed.
        check: String,
    },
    /// Any other argument outside the documented domain.
    #[error("invalid argument: {reason}")]
    InvalidArgument {
        /// What is wrong.
        reason: String,
    },
}

/// Shorthand for `Result<T, isodescent::Error>`.
pub type Result<T> = std::result::Result<T, Error>;
