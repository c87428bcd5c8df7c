//! The typed error of [`super::descend_3isogeny`] on curves with j ≠ 0:
//! whether the curve has a rational 3-isogeny (the case α ≠ 0 of
//! y² = x³ + D(αx + β)², which [`super::descend_3isogeny_general`] takes,
//! with a report of its own) or none at all
//! (no rational root of ψ₃), found by [`crate::curve::rational_3_isogenies`].

use crate::budget::Budget;
use crate::curve::{rational_3_isogenies, Curve};
use crate::error::{Error, Result};

/// The error for a curve with j ≠ 0, after looking for its rational
/// 3-isogenies under `budget`. A failed internal check of the detection
/// is returned as it is; any other error of the detection (budget, size
/// limit of the isogenous curve) is named in the reason.
pub(crate) fn uncovered_curve(e: &Curve, budget: &mut Budget) -> Error {
    match rational_3_isogenies(e, budget) {
        Ok(isos) if isos.is_empty() => Error::NoSupportedIsogeny {
            reason: "no rational 3-isogeny (the 3-division polynomial has no rational root)".into(),
        },
        Ok(isos) => {
            let models: Vec<String> = isos
                .iter()
                .map(|i| {
                    let m = i.model();
                    format!("D = {}, α = {}, β = {}", m.d, m.alpha, m.beta)
                })
                .collect();
            Error::NoSupportedIsogeny {
                reason: format!(
                    "a rational 3-isogeny with α ≠ 0 (y^2 = x^3 + D(αx + β)^2 with {}): \
                     this report covers α = 0 (j = 0) only; descend_3isogeny_general \
                     (or descend_by_isogeny) takes α ≠ 0",
                    models.join("; ")
                ),
            }
        }
        Err(Error::BudgetExhausted { .. }) | Err(Error::FactorBudgetExhausted { .. }) => {
            Error::NoSupportedIsogeny {
                reason: "j(E) ≠ 0, outside the α = 0 (j = 0) case of the descent via \
                         3-isogeny; the search for a rational 3-isogeny was cut by the budget"
                    .into(),
            }
        }
        Err(err @ Error::Internal { .. }) => err,
        Err(other) => Error::NoSupportedIsogeny {
            reason: format!(
                "j(E) ≠ 0, outside the α = 0 (j = 0) case of the descent via 3-isogeny; \
                 the search for a rational 3-isogeny stopped: {other}"
            ),
        },
    }
}

/// [`uncovered_curve`] as a result, for `?`.
pub(crate) fn refuse<T>(e: &Curve, budget: &mut Budget) -> Result<T> {
    Err(uncovered_curve(e, budget))
}
