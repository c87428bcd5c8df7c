//! The Birch–Swinnerton-Dyer ledger: the analytic order of Sha.
//!
//! `Sha_an = (L^{(r)}(E, 1)/r!) · |E(Q)_tors|² / (Ω · Reg · ∏_p c_p)`
//! [BSD63; Tate's formulation, see Sil09, Conj. C.16.5 and Cre97, §3.8]
//! with `Ω = ∫_{E(R)} |ω|` for a Néron differential `ω` (the least real
//! period of the global minimal model times the number of real
//! components), `c_p` the Tamagawa numbers and `Reg` the regulator.
//!
//! Regulator normalisation assumed here: `Reg = det(⟨P_i, P_j⟩)` for a
//! basis `P_i` of `E(Q)` modulo torsion, where `⟨P, Q⟩ = ĥ(P + Q) − ĥ(P) −
//! ĥ(Q)` and `ĥ` is the canonical height of [Sil09, VIII.9],
//! `ĥ(P) = ½·lim h(x(2^nP))/4^n` with `h(a/b) = log max(|a|, |b|)`. Then
//! `⟨P, P⟩ = 2ĥ(P) = lim h(x(2^nP))/4^n`: for rank 1 the regulator is the
//! limit of `h(x(2^nP))/4^n` itself, without the factor ½. This is the
//! normalisation in which the formula above holds as written; the test
//! `rank_one_ledgers_are_squares_with_the_stated_regulator_normalisation`
//! checks it on four rank-one curves, where twice this value gives no
//! square. For rank 0, `Reg = 1`.

use num_bigint::BigInt;
use num_traits::ToPrimitive;

use super::AnalyticData;
use crate::arith::certified::Certified;

/// The analytic order of Sha with its error bound, and how close it is to
/// a square.
#[derive(Debug, Clone, Copy, PartialEq)]
#[non_exhaustive]
pub struct ShaLedger {
    /// `L^{(r)}(E,1)/r! · |tors|² / (Ω·Reg·∏c_p)`, certified.
    pub value: Certified,
    /// The integer square nearest to `value` (`None` when the enclosure
    /// is too wide or the value too large to round).
    pub nearest_square: Option<u64>,
    /// True when `nearest_square` lies within the error bound of `value`.
    pub is_square_within_error: bool,
}

impl ShaLedger {
    /// `|value − nearest_square|`, the deviation from the nearest square.
    pub fn deviation(&self) -> Option<f64> {
        self.nearest_square
            .map(|s| (self.value.value() - s as f64).abs())
    }
}

/// The ledger for a curve of rank `rank` (the algebraic rank, proven
/// elsewhere) from its analytic data, the order of its torsion subgroup,
/// `∏ c_p` and the regulator (`None` is allowed only for rank 0, where
/// `Reg = 1`).
///
/// Returns `None` when an ingredient is missing: no certified
/// `L^{(rank)}(E,1)` (for example `rank > 3` or the wrong parity), no
/// period, a regulator missing for positive rank, or a non-positive
/// divisor.
pub fn sha_analytic(
    data: &AnalyticData,
    rank: usize,
    torsion_order: u32,
    tamagawa_product: &BigInt,
    regulator: Option<Certified>,
) -> Option<ShaLedger> {
    let l = data.l_value(rank)?;
    let omega = data.real_period()?;
    let reg = match (rank, regulator) {
        (0, None) => Certified::exact(1.0),
        (_, Some(r)) => r,
        (_, None) => return None,
    };
    let cp = tamagawa_product
        .to_f64()
        .filter(|v| v.is_finite() && *v > 0.0)?;
    // ∏c_p is an integer; exact in binary64 below 2^53, else rounded.
    let cp = Certified::with_radius(cp, if cp < 9.0e15 { 0.0 } else { cp * f64::EPSILON });
    let fact = [1.0, 1.0, 2.0, 6.0][rank];
    let t = f64::from(torsion_order);
    let value = l.scale(t * t / fact).div(&omega.mul(&reg).mul(&cp));
    if !value.is_finite() {
        return None;
    }
    let nearest_square = if value.value() >= -0.5 && value.value() < 1e15 {
        let s = value.value().max(0.0).sqrt().round();
        Some((s * s) as u64)
    } else {
        None
    };
    let is_square_within_error = match nearest_square {
        Some(s) => {
            let d = Certified::exact(s as f64).minus(&value);
            s > 0 && d.may_be_zero()
        }
        None => false,
    };
    Some(ShaLedger {
        value,
        nearest_square,
        is_square_within_error,
    })
}
