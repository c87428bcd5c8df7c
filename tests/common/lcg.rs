//! A deterministic stream of small integers for the randomised tests of
//! tests/cubic_plane.rs, tests/curve_isogeny3.rs and
//! tests/descent3_general.rs (a linear congruential generator with
//! Knuth's MMIX constants; common practice).
#![allow(dead_code)]

/// The generator's state.
pub struct Lcg(pub u64);

impl Lcg {
    /// The next integer of `[−m, m]`.
    pub fn next(&mut self, m: i64) -> i64 {
        self.0 = self
            .0
            .wrapping_mul(6364136223846793005)
            .wrapping_add(1442695040888963407);
        ((self.0 >> 33) % (2 * m as u64 + 1)) as i64 - m
    }
}
