//! Binary fixed-point real and complex numbers on `num-bigint`.
//!
//! A real number is an integer mantissa `m` read as `m·2^{−p}` for the
//! precision `p` of a [`Fixed`] context (one ulp is `2^{−p}`). Every
//! operation states its error in ulps of its own result, assuming exact
//! inputs; callers add the propagated input errors.
//!
//! | operation | error |
//! |---|---|
//! | `add`, `sub`, `neg`, `mul_int`, `from_int` | exact |
//! | `mul` (real) | ≤ 1 ulp (floor of the exact product) |
//! | `div`, `div_int`, `from_ratio` | ≤ 1 ulp (truncated quotient) |
//! | `sqrt` | ≤ 1 ulp (integer square root of `m·2^p`) |
//! | `cmul` (complex) | ≤ 2 ulp per component |
//! | `pi` | ≤ 1 ulp (computed with 32 guard bits, then truncated) |
//! | `exp` (real, `|x| ≤ 2^{20}`), `expi` | ≤ 2 ulp relative to the result's size (guard bits absorb the Taylor sum and the squarings) |
//! | `agm` | ≤ 4 ulp (guard bits absorb the iteration) |
//!
//! The bounds are those of the standard model of integer truncation
//! (common practice); the guard-bit counts are stated where used. Nothing
//! computed here is claimed as a theorem: the Heegner layer uses these
//! numbers only to propose rational coordinates, which exact arithmetic
//! then checks.

use num_bigint::BigInt;
use num_integer::Integer;
use num_traits::{One, Signed, ToPrimitive, Zero};

/// The precision context: mantissas are read as `m·2^{−p}`.
#[derive(Clone, Copy, Debug, PartialEq, Eq)]
pub(crate) struct Fixed {
    /// Fractional bits.
    pub(crate) p: u32,
}

/// A complex fixed-point number (both parts at the same precision).
#[derive(Clone, Debug, PartialEq, Eq)]
pub(crate) struct Cx {
    pub(crate) re: BigInt,
    pub(crate) im: BigInt,
}

impl Cx {
    pub(crate) fn zero() -> Cx {
        Cx {
            re: BigInt::zero(),
            im: BigInt::zero(),
        }
    }

    pub(crate) fn add(&self, o: &Cx) -> Cx {
        Cx {
            re: &self.re + &o.re,
            im: &self.im + &o.im,
        }
    }
}

impl Fixed {
    pub(crate) fn new(p: u32) -> Fixed {
        Fixed { p }
    }

    /// `1`.
    pub(crate) fn one(&self) -> BigInt {
        BigInt::one() << self.p
    }

    /// The integer `k`, exactly.
    pub(crate) fn int(&self, k: &BigInt) -> BigInt {
        k << self.p
    }

    /// `a/b` (`b ≠ 0`), ≤ 1 ulp.
    pub(crate) fn ratio(&self, a: &BigInt, b: &BigInt) -> BigInt {
        (a << self.p) / b
    }

    /// `a·b`, ≤ 1 ulp.
    pub(crate) fn mul(&self, a: &BigInt, b: &BigInt) -> BigInt {
        (a * b) >> self.p
    }

    /// `a/b` (`b ≠ 0`), ≤ 1 ulp.
    pub(crate) fn div(&self, a: &BigInt, b: &BigInt) -> BigInt {
        (a << self.p) / b
    }

    /// `√a` for `a ≥ 0` (0 for negative input), ≤ 1 ulp.
    pub(crate) fn sqrt(&self, a: &BigInt) -> BigInt {
        if a.is_negative() {
            return BigInt::zero();
        }
        (a << self.p).sqrt()
    }

    /// `(a + bi)(c + di)`, ≤ 2 ulp per component.
    pub(crate) fn cmul(&self, x: &Cx, y: &Cx) -> Cx {
        Cx {
            re: (&x.re * &y.re - &x.im * &y.im) >> self.p,
            im: (&x.re * &y.im + &x.im * &y.re) >> self.p,
        }
    }

    /// A mantissa moved to precision `q` (truncated when `q < p`: ≤ 1 ulp
    /// of the new precision).
    pub(crate) fn rescale(&self, a: &BigInt, q: u32) -> BigInt {
        if q >= self.p {
            a << (q - self.p)
        } else {
            a >> (self.p - q)
        }
    }

    /// An approximation in binary64 (for sizes and estimates only).
    pub(crate) fn approx_f64(&self, a: &BigInt) -> f64 {
        let bits = a.bits();
        if bits > 1000 {
            let shift = bits - 60;
            let top = (a >> shift).to_f64().unwrap_or(0.0);
            return top * 2f64.powi((shift as i64 - i64::from(self.p)) as i32);
        }
        let shift = bits.saturating_sub(60);
        let top = (a >> shift).to_f64().unwrap_or(0.0);
        top * 2f64.powf(shift as f64 - f64::from(self.p))
    }

    /// π, ≤ 1 ulp: Machin's formula `π = 16·atan(1/5) − 4·atan(1/239)`
    /// (common practice) at 32 guard bits; each of the `T < p` series terms
    /// errs by ≤ 2 guard ulps, far below the 2^32 guard margin.
    pub(crate) fn pi(&self) -> BigInt {
        let g = Fixed::new(self.p + 32);
        let atan_inv = |k: u64| -> BigInt {
            let k2 = BigInt::from(k * k);
            let mut t = g.one() / BigInt::from(k); // 1/k^{2j+1}
            let mut s = BigInt::zero();
            let mut j = 0u64;
            while !t.is_zero() {
                let term = &t / BigInt::from(2 * j + 1);
                if j % 2 == 0 {
                    s += term;
                } else {
                    s -= term;
                }
                t /= &k2;
                j += 1;
            }
            s
        };
        let v = atan_inv(5) * 16 - atan_inv(239) * 4;
        g.rescale(&v, self.p)
    }

    /// `e^x` for a real `x` with `|x| ≤ 2^{20}`: halving `s` times to
    /// `|x/2^s| < 2^{−8}`, Taylor's series to below one guard ulp, then
    /// `s` squarings, all at `s + 40` guard bits (each squaring at most
    /// doubles the relative error, so `s` extra bits cover them; the
    /// series' ≤ `2p` rounding errors are covered by the other 40).
    pub(crate) fn exp(&self, x: &BigInt) -> BigInt {
        let mag = (x.abs() >> self.p).bits() as u32;
        let s = mag + 8;
        let g = Fixed::new(self.p + s + 40 + mag);
        let r = self.rescale(x, g.p) >> s;
        let mut sum = g.one();
        let mut term = g.one();
        let mut k = 1u64;
        loop {
            term = g.mul(&term, &r) / BigInt::from(k);
            if term.is_zero() {
                break;
            }
            sum += &term;
            k += 1;
        }
        for _ in 0..s {
            sum = g.mul(&sum, &sum);
        }
        g.rescale(&sum, self.p)
    }

    /// `e^{iθ} = cos θ + i sin θ` for a real `θ` with `|θ| ≤ 2^{20}`
    /// (the same scheme as [`Fixed::exp`], with complex squarings; the
    /// result has modulus 1 up to the stated error).
    pub(crate) fn expi(&self, theta: &BigInt) -> Cx {
        let mag = (theta.abs() >> self.p).bits() as u32;
        let s = mag + 8;
        let g = Fixed::new(self.p + s + 40 + mag);
        let r = self.rescale(theta, g.p) >> s;
        // Σ (ir)^k/k!: real part from even k, imaginary from odd k.
        let mut re = g.one();
        let mut im = BigInt::zero();
        let mut term = g.one();
        let mut k = 1u64;
        loop {
            term = g.mul(&term, &r) / BigInt::from(k);
            if term.is_zero() {
                break;
            }
            match k % 4 {
                1 => im += &term,
                2 => re -= &term,
                3 => im -= &term,
                _ => re += &term,
            }
            k += 1;
        }
        let mut z = Cx { re, im };
        for _ in 0..s {
            z = g.cmul(&z, &z);
        }
        Cx {
            re: g.rescale(&z.re, self.p),
            im: g.rescale(&z.im, self.p),
        }
    }

    /// The arithmetic–geometric mean of two positive numbers, ≤ 4 ulp:
    /// the iteration runs at 16 guard bits until both means agree to
    /// 2 guard ulps (quadratic convergence: about `log₂ p` steps, each
    /// adding ≤ 2 guard ulps).
    pub(crate) fn agm(&self, a: &BigInt, b: &BigInt) -> BigInt {
        let g = Fixed::new(self.p + 16);
        let mut x = self.rescale(a, g.p);
        let mut y = self.rescale(b, g.p);
        for _ in 0..200 {
            if (&x - &y).abs() <= BigInt::from(2) {
                break;
            }
            let nx: BigInt = (&x + &y) >> 1;
            let ny = g.sqrt(&g.mul(&x, &y));
            x = nx;
            y = ny;
        }
        g.rescale(&x, self.p)
    }

    /// `x` rounded to the nearest integer.
    pub(crate) fn round(&self, x: &BigInt) -> BigInt {
        let half = BigInt::one() << (self.p.saturating_sub(1));
        (x + half).div_floor(&self.one())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn digits(f: &Fixed, x: &BigInt, n: usize) -> String {
        // x in decimal with n digits after the point (truncated).
        let scaled = (x * BigInt::from(10).pow(n as u32)) >> f.p;
        scaled.to_string()
    }

    #[test]
    fn pi_and_e_to_sixty_digits() {
        // π and e to 60 decimals (Abramowitz–Stegun, Table 1.1; from memory).
        let f = Fixed::new(256);
        assert_eq!(
            digits(&f, &f.pi(), 60),
            "3141592653589793238462643383279502884197169399375105820974944"
        );
        assert_eq!(
            digits(&f, &f.exp(&f.one()), 60),
            "2718281828459045235360287471352662497757247093699959574966967"
        );
    }

    #[test]
    fn exponential_identities_hold_to_the_stated_error() {
        let f = Fixed::new(300);
        let pi = f.pi();
        // e^{iπ} = −1, e^{iπ/2} = i, e^{x}e^{−x} = 1, e^{iθ}·e^{iθ} = e^{2iθ}.
        let m1 = f.expi(&pi);
        assert!((m1.re + f.one()).abs() < BigInt::from(16) && m1.im.abs() < BigInt::from(16));
        let half = f.expi(&(&pi >> 1));
        assert!(half.re.abs() < BigInt::from(16) && (half.im - f.one()).abs() < BigInt::from(16));
        let x = f.ratio(&BigInt::from(-37), &BigInt::from(7));
        let p = f.mul(&f.exp(&x), &f.exp(&-&x));
        assert!((p - f.one()).abs() < BigInt::from(64));
        let t = f.ratio(&BigInt::from(5), &BigInt::from(3));
        let a = f.expi(&t);
        let b = f.expi(&(&t * 2));
        let a2 = f.cmul(&a, &a);
        assert!((a2.re - b.re).abs() < BigInt::from(64) && (a2.im - b.im).abs() < BigInt::from(64));
    }

    #[test]
    fn gauss_agm_constant() {
        // M(1, √2) = 1.19814023473559220743992249228032387822721266321…
        // (Gauss's constant times √2; from memory), and π/M(√2, 1) is
        // the lemniscate constant 2.62205755429211981046483958989111941…
        // (from memory).
        let f = Fixed::new(200);
        let r2 = f.sqrt(&f.int(&BigInt::from(2)));
        let m = f.agm(&f.one(), &r2);
        assert_eq!(
            &digits(&f, &m, 40)[..40],
            "1198140234735592207439922492280323878227"
        );
        let w = f.div(&f.pi(), &m);
        assert_eq!(
            &digits(&f, &w, 40)[..40],
            "2622057554292119810464839589891119413682"
        );
    }
}
