//! The global root number from local root numbers, where the local ones
//! are given by closed formulas.
//!
//! `w(E) = −∏_p w_p` (the factor `−1` is `w_∞`). For every prime `p`:
//! good reduction `w_p = +1`; split multiplicative `−1`; non-split
//! multiplicative `+1`. For `p ≥ 5` and additive reduction [Rohrlich93,
//! Prop. 2] (from memory): potentially multiplicative (`v_p(j) < 0`, Kodaira
//! type `I_n*`, `n ≥ 1`) `w_p = (−1/p)`; potentially good with
//! `e = 12/gcd(12, v_p(Δ))`: `(−1/p)` for `e ∈ {2, 6}` (types I0*, II,
//! II*), `(−2/p)` for `e = 4` (III, III*), `(−3/p)` for `e = 3` (IV, IV*).
//!
//! At 2 and 3 with additive reduction no formula is used here; there the
//! root number is determined by the certified functional-equation test of
//! the `series` module.

use num_bigint::BigInt;

use crate::curve::tate::{GlobalLocalData, Kodaira, ReductionKind};
use crate::local::{legendre, Prime};

/// The local root number `w_p` by the formulas above, or `None` for
/// additive reduction at 2 or 3.
pub fn local_root_number(kind: ReductionKind, kodaira: Kodaira, p: &Prime) -> Option<i8> {
    match kind {
        ReductionKind::Good | ReductionKind::NonSplitMultiplicative => Some(1),
        ReductionKind::SplitMultiplicative => Some(-1),
        ReductionKind::Additive => {
            if p.to_u64().is_some_and(|q| q < 5) {
                return None;
            }
            let k: i64 = match kodaira {
                Kodaira::III | Kodaira::IIIStar => -2,
                Kodaira::IV | Kodaira::IVStar => -3,
                _ => -1,
            };
            legendre(&BigInt::from(k), p).ok()
        }
    }
}

/// `−∏ w_p` when every local factor has a formula here, else `None`.
pub fn root_number_by_formula(local: &GlobalLocalData) -> Option<i8> {
    let mut w: i8 = -1;
    for lr in &local.primes {
        w *= local_root_number(lr.reduction, lr.kodaira, &lr.prime)?;
    }
    Some(w)
}
