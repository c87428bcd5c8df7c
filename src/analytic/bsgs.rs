//! Baby-step giant-step for `a_p`, `p < 2³¹`, in Montgomery arithmetic
//! with Jacobian coordinates and batched inversions.
//!
//! Same method and same proof as the affine version in
//! [`super::coefficients`]: for a point `P` of `Y² = X³ + a'X + b'` the
//! set of all `b` in the Hasse interval with `(p + 1 − b)P = O` is found
//! exactly; the true value is in every such set. Montgomery's REDC with
//! `R = 2³²` [Montgomery85] replaces divisions; points are kept in Jacobian
//! coordinates (`x = X/Z², y = Y/Z³`) and brought back to affine form in
//! batches with one inversion per batch (Montgomery's simultaneous
//! inversion [Montgomery87, §10.3.1]). Formulas: the standard Jacobian
//! doubling and mixed addition [Cohen93, §7.1.3] (common practice).

use crate::local::legendre_u64;

/// Arithmetic modulo an odd `p < 2³¹` in Montgomery form, `R = 2³²`.
#[derive(Clone, Copy)]
pub(super) struct Mont {
    p: u64,
    /// `−p⁻¹ mod 2³²`.
    pinv: u32,
    /// `R² mod p`.
    r2: u64,
}

impl Mont {
    pub(super) fn new(p: u64) -> Mont {
        // Newton iteration for p⁻¹ mod 2³² (p odd).
        let mut inv: u32 = 1;
        for _ in 0..5 {
            inv = inv.wrapping_mul(2u32.wrapping_sub((p as u32).wrapping_mul(inv)));
        }
        let r = (1u64 << 32) % p;
        Mont {
            p,
            pinv: inv.wrapping_neg(),
            r2: (r * r) % p,
        }
    }

    #[inline]
    fn redc(&self, t: u64) -> u64 {
        // t < p² < 2⁶², m·p < 2⁶³: no overflow.
        let m = u64::from((t as u32).wrapping_mul(self.pinv));
        let u = (t + m * self.p) >> 32;
        if u >= self.p {
            u - self.p
        } else {
            u
        }
    }

    #[inline]
    pub(super) fn mul(&self, a: u64, b: u64) -> u64 {
        self.redc(a * b)
    }

    #[inline]
    fn add(&self, a: u64, b: u64) -> u64 {
        let s = a + b;
        if s >= self.p {
            s - self.p
        } else {
            s
        }
    }

    #[inline]
    fn sub(&self, a: u64, b: u64) -> u64 {
        if a >= b {
            a - b
        } else {
            a + self.p - b
        }
    }

    pub(super) fn to(&self, a: u64) -> u64 {
        self.mul(a % self.p, self.r2)
    }

    pub(super) fn from(&self, a: u64) -> u64 {
        self.redc(a)
    }

    /// Inverse of a non-zero Montgomery residue.
    fn inv(&self, a: u64) -> u64 {
        let x = self.from(a);
        let (mut r0, mut r1) = (self.p as i64, x as i64);
        let (mut t0, mut t1) = (0i64, 1i64);
        while r1 != 0 {
            let q = r0 / r1;
            (r0, r1) = (r1, r0 - q * r1);
            (t0, t1) = (t1, t0 - q * t1);
        }
        self.to(t0.rem_euclid(self.p as i64) as u64)
    }
}

/// A Jacobian point; `z = 0` is the point at infinity.
#[derive(Clone, Copy)]
struct Jac {
    x: u64,
    y: u64,
    z: u64,
}

/// A short Weierstrass curve `y² = x³ + ax + b` over F_p, `a` in the
/// Montgomery form of `f` (Jacobian doubling needs only `a`).
struct ShortCurveFp {
    f: Mont,
    a: u64,
    one: u64,
}

impl ShortCurveFp {
    fn double(&self, p: Jac) -> Jac {
        let f = &self.f;
        if p.z == 0 || p.y == 0 {
            return Jac {
                x: self.one,
                y: self.one,
                z: 0,
            };
        }
        let xx = f.mul(p.x, p.x);
        let yy = f.mul(p.y, p.y);
        let yyyy = f.mul(yy, yy);
        let zz = f.mul(p.z, p.z);
        let s = f.mul(f.add(p.x, p.x), f.add(yy, yy)); // 4·X·Y²
        let m = f.add(f.add(f.add(xx, xx), xx), f.mul(self.a, f.mul(zz, zz)));
        let x3 = f.sub(f.mul(m, m), f.add(s, s));
        let y8 = f.add(yyyy, yyyy);
        let y8 = f.add(y8, y8);
        let y8 = f.add(y8, y8);
        let y3 = f.sub(f.mul(m, f.sub(s, x3)), y8);
        let z3 = f.mul(f.add(p.y, p.y), p.z);
        Jac {
            x: x3,
            y: y3,
            z: z3,
        }
    }

    /// `p + (x2, y2)` with the second point affine.
    fn add_affine(&self, p: Jac, x2: u64, y2: u64) -> Jac {
        let f = &self.f;
        if p.z == 0 {
            return Jac {
                x: x2,
                y: y2,
                z: self.one,
            };
        }
        let z1z1 = f.mul(p.z, p.z);
        let u2 = f.mul(x2, z1z1);
        let s2 = f.mul(y2, f.mul(p.z, z1z1));
        let h = f.sub(u2, p.x);
        let r = f.sub(s2, p.y);
        if h == 0 {
            return if r == 0 {
                self.double(p)
            } else {
                Jac {
                    x: self.one,
                    y: self.one,
                    z: 0,
                }
            };
        }
        let hh = f.mul(h, h);
        let hhh = f.mul(h, hh);
        let v = f.mul(p.x, hh);
        let x3 = f.sub(f.sub(f.mul(r, r), hhh), f.add(v, v));
        let y3 = f.sub(f.mul(r, f.sub(v, x3)), f.mul(p.y, hhh));
        let z3 = f.mul(p.z, h);
        Jac {
            x: x3,
            y: y3,
            z: z3,
        }
    }

    fn mul(&self, x: u64, y: u64, k: u64) -> Jac {
        let mut r = Jac {
            x: self.one,
            y: self.one,
            z: 0,
        };
        if k == 0 {
            return r;
        }
        let top = 63 - k.leading_zeros();
        r = Jac { x, y, z: self.one };
        for bit in (0..top).rev() {
            r = self.double(r);
            if (k >> bit) & 1 == 1 {
                r = self.add_affine(r, x, y);
            }
        }
        r
    }

    /// Affine coordinates of each point (`None` for infinity), one
    /// inversion in all.
    fn normalise(&self, pts: &[Jac]) -> Vec<Option<(u64, u64)>> {
        let f = &self.f;
        let mut prefix = Vec::with_capacity(pts.len());
        let mut acc = self.one;
        for q in pts {
            if q.z != 0 {
                acc = f.mul(acc, q.z);
            }
            prefix.push(acc);
        }
        let mut inv = f.inv(acc);
        let mut out = vec![None; pts.len()];
        for i in (0..pts.len()).rev() {
            let q = pts[i];
            if q.z == 0 {
                continue;
            }
            let before = if i == 0 { self.one } else { prefix[i - 1] };
            let zinv = f.mul(inv, before);
            inv = f.mul(inv, q.z);
            let z2 = f.mul(zinv, zinv);
            out[i] = Some((f.mul(q.x, z2), f.mul(q.y, f.mul(z2, zinv))));
        }
        out
    }
}

/// All `N ∈ [lo, hi]` (`lo ≥ 1`) with `N·P = O` for the affine point
/// `(x, y)` (Montgomery form), or `None` if `P` has order ≤ 2m + 1 (then
/// it says little and is skipped).
fn multiples_in(e: &ShortCurveFp, x: u64, y: u64, lo: u64, hi: u64) -> Option<Vec<u64>> {
    let width = hi - lo + 1;
    let m = ((width as f64 / 2.0).sqrt().ceil() as u64).max(1);
    let mut chain = Vec::with_capacity(m as usize);
    let mut q = Jac { x, y, z: e.one };
    for _ in 0..m {
        if q.z == 0 {
            return None;
        }
        chain.push(q);
        q = e.add_affine(q, x, y);
    }
    let aff = e.normalise(&chain);
    let mut baby: Vec<(u64, u64, u64)> = Vec::with_capacity(m as usize);
    for (j, a) in aff.iter().enumerate() {
        let (bx, by) = (*a)?;
        if by == 0 {
            return None;
        }
        baby.push((bx, by, j as u64 + 1));
    }
    baby.sort_unstable();
    if baby.windows(2).any(|w| w[0].0 == w[1].0) {
        return None; // j·P = ±k·P: order ≤ 2m
    }
    // Centres c_i = lo + m + i·s cover [c_i − m, c_i + m].
    let s = 2 * m + 1;
    let steps = width.div_ceil(s);
    let sp = e.normalise(&[e.mul(x, y, s)]);
    let (sx, sy) = sp.first().copied().flatten()?;
    let mut giant = Vec::with_capacity(steps as usize);
    let mut r = e.mul(x, y, lo + m);
    for _ in 0..steps {
        giant.push(r);
        r = e.add_affine(r, sx, sy);
    }
    let gaff = e.normalise(&giant);
    let mut out = Vec::new();
    for (i, g) in gaff.iter().enumerate() {
        let c = lo + m + i as u64 * s;
        match g {
            None => out.push(c),
            Some((gx, gy)) => {
                if let Ok(k) = baby.binary_search_by(|b| b.0.cmp(gx)) {
                    let (_, by, j) = baby[k];
                    // c·P = j·P ⇒ (c − j)·P = O; c·P = −j·P ⇒ (c + j)·P = O.
                    out.push(if by == *gy { c - j } else { c + j });
                }
            }
        }
    }
    out.retain(|n| (lo..=hi).contains(n));
    Some(out)
}

/// All `b`, `|b| ≤ bound`, `b ≡ p + 1 (mod k)`, with `(p + 1 − b)·P = O`,
/// where `k` divides the group order: searched as `N·(kP) = O` with
/// `p + 1 − b = kN` (the same condition). `None` for points of small order.
fn candidates(e: &ShortCurveFp, x: u64, y: u64, bound: u64, k: u64) -> Option<Vec<i64>> {
    let p = e.f.p;
    let (kx, ky) = if k == 1 {
        (x, y)
    } else {
        e.normalise(&[e.mul(x, y, k)]).first().copied().flatten()?
    };
    let lo = (p + 1 - bound).div_ceil(k);
    let hi = (p + 1 + bound) / k;
    let ns = multiples_in(e, kx, ky, lo, hi)?;
    let mut out: Vec<i64> = ns
        .into_iter()
        .map(|n| (p + 1) as i64 - (k * n) as i64)
        .collect();
    out.sort_unstable();
    out.dedup();
    Some(out)
}

/// `a_p` of `y² = x³ + ax + b` (plain residues) for a prime
/// `5 ≤ p < 2³¹` of good reduction; `None` if undecided after `tries`
/// points. `k_curve` must divide `#E(F_p)` and `k_twist` the order of the
/// quadratic twist (1 always does).
pub(crate) fn ap_fast(
    a: u64,
    b: u64,
    p: u64,
    tries: u64,
    k_curve: u64,
    k_twist: u64,
) -> Option<i64> {
    debug_assert!((5..(1 << 31)).contains(&p));
    let f = Mont::new(p);
    let bound = super::coefficients::hasse_width(p);
    let mut live: Option<Vec<i64>> = None;
    let mut tried = 0;
    let mut x0 = 0u64;
    while tried < tries && x0 < p {
        let d = ((x0 * x0 % p + a) % p * x0 % p + b) % p;
        let xx = x0;
        x0 += 1;
        if d == 0 {
            continue;
        }
        tried += 1;
        let chi = i64::from(legendre_u64(d, p));
        let d2 = d * d % p;
        let e = ShortCurveFp {
            f,
            a: f.to(a * d2 % p),
            one: f.to(1),
        };
        let k = if chi == 1 { k_curve } else { k_twist };
        let c = candidates(&e, f.to(xx * d % p), f.to(d2), bound, k.max(1));
        let Some(c) = c else { continue };
        match narrow_candidates(&mut live, c, chi) {
            Narrowed::One(ap) => return Some(ap),
            Narrowed::None => return None,
            Narrowed::Several => {}
        }
    }
    None
}

/// What is left of the candidates for `a_p` after one more point.
pub(crate) enum Narrowed {
    /// Exactly one candidate: `a_p`.
    One(i64),
    /// None left (impossible for a nonsingular curve; the caller falls back).
    None,
    /// Still several; `live` holds them.
    Several,
}

/// Intersects the candidates `c` for `χ·a_p` (translated to `a_p`) with
/// those still `live` from earlier points.
pub(crate) fn narrow_candidates(live: &mut Option<Vec<i64>>, c: Vec<i64>, chi: i64) -> Narrowed {
    let c: Vec<i64> = c.into_iter().map(|v| v * chi).collect();
    let next: Vec<i64> = match live.take() {
        None => c,
        Some(prev) => prev.into_iter().filter(|v| c.contains(v)).collect(),
    };
    match next.as_slice() {
        [] => Narrowed::None,
        [ap] => Narrowed::One(*ap),
        _ => {
            *live = Some(next);
            Narrowed::Several
        }
    }
}
