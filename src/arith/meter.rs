//! Charging factoring work to a [`Budget`] in proportion to its cost.
//!
//! The factoring methods count raw operations of very different price: a
//! modular multiplication on a `k`-word cofactor costs about `k²` word
//! products, a sieve-array update is a byte addition. A [`Scaled`] meter
//! turns raw operations into budget units with a rational weight, so that
//! one budget unit stands for about the same amount of time whichever
//! method spends it (see [`super::factor::factor`] for the cost model).

use crate::budget::{Budget, Exhausted};

/// Something that work can be charged to.
pub(crate) trait Meter {
    /// Charges `ops` raw operations; fails once the budget has run out.
    fn spend(&mut self, ops: u64) -> Result<(), Exhausted>;
}

impl Meter for Budget {
    fn spend(&mut self, ops: u64) -> Result<(), Exhausted> {
        Budget::spend(self, ops)
    }
}

/// Charges `ops · num / den` units to the inner budget, carrying the
/// remainder so that nothing is lost to rounding.
pub(crate) struct Scaled<'a> {
    inner: &'a mut Budget,
    num: u64,
    den: u64,
    carry: u128,
}

impl<'a> Scaled<'a> {
    /// A meter with weight `num / den` (`den ≥ 1`; a zero `den` is
    /// treated as 1).
    pub(crate) fn new(inner: &'a mut Budget, num: u64, den: u64) -> Self {
        Scaled {
            inner,
            num,
            den: den.max(1),
            carry: 0,
        }
    }
}

impl Meter for Scaled<'_> {
    fn spend(&mut self, ops: u64) -> Result<(), Exhausted> {
        self.carry += ops as u128 * self.num as u128;
        let units = self.carry / self.den as u128;
        self.carry %= self.den as u128;
        self.inner.spend(u64::try_from(units).unwrap_or(u64::MAX))
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_scaled_meter_charges_the_rounded_down_total_and_keeps_the_rest() {
        let mut b = Budget::with_units(100);
        {
            let mut m = Scaled::new(&mut b, 1, 8);
            for _ in 0..20 {
                m.spend(3).unwrap(); // 60 ops at 1/8 -> 7 units, 4/8 carried
            }
        }
        assert_eq!(b.spent(), 7);
    }

    #[test]
    fn a_scaled_meter_reports_exhaustion_of_the_inner_budget() {
        let mut b = Budget::with_units(10);
        let mut m = Scaled::new(&mut b, 4, 1);
        assert!(m.spend(2).is_ok());
        assert!(m.spend(1).is_err());
    }
}
