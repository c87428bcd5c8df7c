//! Effort budgets counted in deterministic work units.
//!
//! A [`Budget`] is handed to every routine whose running time depends on its
//! input in a way the caller cannot predict (factorisation, local
//! solvability, point search, second descent). Each routine charges units
//! for the work it does (one unit is roughly one modular multiplication or
//! one sieved candidate, see each routine's docs), so the same input and the
//! same budget always stop at the same place: results are reproducible.
//! An optional wall-clock deadline can be added on top; a run that hits the
//! deadline is, by nature, not reproducible.
//!
//! ---
//!
//! The guide below is `docs/robustness.md`, included verbatim.
#![doc = include_str!("../docs/robustness.md")]

use std::time::Instant;

/// The budget ran out (units or deadline).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub(crate) struct Exhausted;

/// A budget of deterministic work units with an optional deadline.
#[derive(Debug, Clone)]
pub struct Budget {
    limit: Option<u64>,
    spent: u64,
    deadline: Option<Instant>,
    /// Deadline checks are done only every `DEADLINE_STRIDE` units.
    next_clock_check: u64,
    /// Set once a charge or a clock check failed (units or deadline).
    tripped: bool,
}

/// Units between two reads of the clock when a deadline is set.
const DEADLINE_STRIDE: u64 = 1 << 12;

impl Default for Budget {
    fn default() -> Self {
        Self::unlimited()
    }
}

impl Budget {
    /// A budget that never runs out.
    pub fn unlimited() -> Self {
        Budget {
            limit: None,
            spent: 0,
            deadline: None,
            next_clock_check: DEADLINE_STRIDE,
            tripped: false,
        }
    }

    /// A budget of `units` work units.
    pub fn with_units(units: u64) -> Self {
        Budget {
            limit: Some(units),
            ..Self::unlimited()
        }
    }

    /// Adds a wall-clock deadline on top of the unit count.
    pub fn with_deadline(mut self, deadline: Instant) -> Self {
        self.deadline = Some(deadline);
        self
    }

    /// Units spent so far.
    pub fn spent(&self) -> u64 {
        self.spent
    }

    /// Units left, or `None` for an unlimited budget.
    pub(crate) fn remaining(&self) -> Option<u64> {
        self.limit.map(|l| l.saturating_sub(self.spent))
    }

    /// True once the budget has run out: its units are spent, or a charge
    /// or a clock check found the deadline passed.
    pub(crate) fn is_exhausted(&self) -> bool {
        self.tripped || matches!(self.limit, Some(l) if self.spent > l)
    }

    /// The deadline, if any.
    pub(crate) fn deadline(&self) -> Option<Instant> {
        self.deadline
    }

    /// Reads the clock now (not only every few thousand units) and fails
    /// if the deadline has passed; for steps whose single units are slow
    /// (big-number arithmetic on huge models).
    pub(crate) fn check_deadline(&mut self) -> Result<(), Exhausted> {
        if let Some(d) = self.deadline {
            if Instant::now() >= d {
                self.tripped = true;
                return Err(Exhausted);
            }
        }
        if self.is_exhausted() {
            return Err(Exhausted);
        }
        Ok(())
    }

    /// Charges `units`; fails once the total exceeds the limit or the
    /// deadline has passed.
    pub(crate) fn spend(&mut self, units: u64) -> Result<(), Exhausted> {
        self.spent = self.spent.saturating_add(units);
        if let Some(l) = self.limit {
            if self.spent > l {
                self.tripped = true;
                return Err(Exhausted);
            }
        }
        if let Some(d) = self.deadline {
            if self.spent >= self.next_clock_check {
                self.next_clock_check = self.spent.saturating_add(DEADLINE_STRIDE);
                if Instant::now() >= d {
                    self.tripped = true;
                    return Err(Exhausted);
                }
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn a_unit_budget_runs_out_exactly_after_its_limit() {
        let mut b = Budget::with_units(10);
        assert!(b.spend(10).is_ok());
        assert_eq!(b.remaining(), Some(0));
        assert_eq!(b.spend(1), Err(Exhausted));
        assert!(b.is_exhausted());
    }

    #[test]
    fn an_unlimited_budget_never_runs_out() {
        let mut b = Budget::unlimited();
        assert!(b.spend(u64::MAX).is_ok());
        assert!(b.spend(u64::MAX).is_ok());
        assert_eq!(b.remaining(), None);
    }

    #[test]
    fn a_past_deadline_stops_the_work() {
        let mut b = Budget::unlimited().with_deadline(Instant::now());
        assert_eq!(b.spend(DEADLINE_STRIDE), Err(Exhausted));
        // and the budget remembers it (common practice)
        assert!(b.is_exhausted());
    }

    #[test]
    fn a_clock_check_reads_the_clock_at_once() {
        let mut b = Budget::unlimited().with_deadline(Instant::now());
        assert!(!b.is_exhausted());
        assert_eq!(b.check_deadline(), Err(Exhausted));
        assert!(b.is_exhausted());
        let mut free = Budget::with_units(5);
        assert_eq!(free.check_deadline(), Ok(()));
    }
}
