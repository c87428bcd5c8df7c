//! Vectors over F3 (entries 0, 1, 2) and their spans, in echelon form.

/// A ⊕ b over F3.
pub(crate) fn add(a: &[u8], b: &[u8]) -> Vec<u8> {
    a.iter().zip(b).map(|(x, y)| (x + y) % 3).collect()
}

/// s·a over F3.
pub(crate) fn scale(a: &[u8], s: u8) -> Vec<u8> {
    a.iter().map(|x| (x * s) % 3).collect()
}

/// a − b over F3.
pub(crate) fn sub(a: &[u8], b: &[u8]) -> Vec<u8> {
    add(a, &scale(b, 2))
}

/// A subspace of F3^n kept in echelon form (each row's pivot is 1).
#[derive(Debug, Clone, Default)]
pub(crate) struct Span {
    rows: Vec<(usize, Vec<u8>)>,
}

impl Span {
    /// The reduction of `v` against the rows.
    fn reduce(&self, v: &[u8]) -> Vec<u8> {
        let mut v = v.to_vec();
        for (piv, row) in &self.rows {
            let c = v[*piv];
            if c != 0 {
                v = sub(&v, &scale(row, c));
            }
        }
        v
    }

    /// True when `v` lies in the span.
    pub(crate) fn contains(&self, v: &[u8]) -> bool {
        self.reduce(v).iter().all(|&x| x == 0)
    }

    /// Adds `v`; true when it enlarged the span.
    pub(crate) fn insert(&mut self, v: &[u8]) -> bool {
        let r = self.reduce(v);
        let Some(piv) = r.iter().position(|&x| x != 0) else {
            return false;
        };
        // Normalise the pivot to 1 (2·2 = 1 in F3).
        let r = if r[piv] == 2 { scale(&r, 2) } else { r };
        // Keep the other rows reduced at the new pivot.
        for (_, row) in self.rows.iter_mut() {
            let c = row[piv];
            if c != 0 {
                *row = sub(row, &scale(&r, c));
            }
        }
        self.rows.push((piv, r));
        true
    }

    /// The dimension.
    pub(crate) fn dim(&self) -> usize {
        self.rows.len()
    }
}

/// The cosets r, r + b, r + 2b of every r in `reps` (one F3-dimension
/// more), while the list stays within 729 = 3⁶ entries: the local image at
/// `p` has index at most 3⁶ in its group, so a longer list is an internal
/// fault.
pub(crate) fn with_multiples(
    reps: &[Vec<u8>],
    b: &[u8],
    p: &num_bigint::BigInt,
) -> crate::error::Result<Vec<Vec<u8>>> {
    if reps.len() * 3 > 729 {
        return Err(crate::error::Error::Internal {
            check: format!("the local image at {p} has small index"),
        });
    }
    let b2 = scale(b, 2);
    let mut next = Vec::with_capacity(reps.len() * 3);
    for r in reps {
        next.push(r.clone());
        next.push(add(r, b));
        next.push(add(r, &b2));
    }
    Ok(next)
}

/// The subgroup L ∩ L_p of the span of `l` (a basis of vectors in
/// F3^`dim`), where L_p is the subgroup of classes that pass `soluble` at
/// `p`, found with only membership tests: coset representatives of
/// L/(L ∩ L_p) are kept (at most |H¹(Q_p)| / |image| of them), and each
/// basis vector either lands in a known coset (giving a new vector of the
/// intersection, kept with the witness of its test) or multiplies the
/// cosets by 3. One loop for both 3-isogeny descents: the binary-form
/// cubics of `side` and the plane cubics of `flex`.
pub(crate) fn soluble_subgroup<W>(
    dim: usize,
    l: &[Vec<u8>],
    p: &num_bigint::BigInt,
    mut soluble: impl FnMut(&[u8]) -> crate::error::Result<Option<W>>,
) -> crate::error::Result<Vec<(Vec<u8>, W)>> {
    let mut reps: Vec<Vec<u8>> = vec![vec![0u8; dim]];
    let mut kept = Vec::new();
    for b in l {
        let mut hit = None;
        for r in &reps {
            let cand = sub(b, r);
            if let Some(w) = soluble(&cand)? {
                hit = Some((cand, w));
                break;
            }
        }
        match hit {
            Some(found) => kept.push(found),
            None => reps = with_multiples(&reps, b, p)?,
        }
    }
    Ok(kept)
}

/// The Selmer group of a side: the unit basis of F3^`dim` cut down by
/// [`soluble_subgroup`] at each prime of `primes` in turn, and for each
/// vector of the final basis a witness at every prime of `primes`
/// (`soluble` is asked again, so the witnesses are those of the final
/// basis). `curve` names the side in the internal error of a basis vector
/// that is not soluble.
pub(crate) fn selmer_basis<W>(
    dim: usize,
    primes: &[num_bigint::BigInt],
    curve: &str,
    mut soluble: impl FnMut(&[u8], &crate::local::Prime) -> crate::error::Result<Option<W>>,
) -> crate::error::Result<SelmerBasis<W>> {
    use crate::local::Prime;
    let mut l: Vec<Vec<u8>> = (0..dim)
        .map(|i| {
            let mut v = vec![0u8; dim];
            v[i] = 1;
            v
        })
        .collect();
    for p in primes {
        let pr = Prime::new(p.clone())?;
        l = soluble_subgroup(dim, &l, p, |v| soluble(v, &pr))?
            .into_iter()
            .map(|(v, _)| v)
            .collect();
    }
    let mut witnesses = Vec::new();
    for v in &l {
        for p in primes {
            match soluble(v, &Prime::new(p.clone())?)? {
                Some(w) => witnesses.push((v.clone(), p.clone(), w)),
                None => {
                    return Err(crate::error::Error::Internal {
                        check: format!("a Selmer basis vector of {curve} is soluble at {p}"),
                    })
                }
            }
        }
    }
    Ok(SelmerBasis {
        basis: l,
        witnesses,
    })
}

/// A Selmer basis over F3 with, for each basis vector and each prime of
/// S, the witness of its local solubility.
pub(crate) struct SelmerBasis<W> {
    pub(crate) basis: Vec<Vec<u8>>,
    pub(crate) witnesses: Vec<(Vec<u8>, num_bigint::BigInt, W)>,
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn spans() {
        let mut s = Span::default();
        assert!(s.insert(&[1, 2, 0]));
        assert!(s.insert(&[0, 1, 1]));
        assert!(!s.insert(&[1, 0, 1])); // (1,2,0) + (0,1,1)
        assert_eq!(s.dim(), 2);
        assert!(s.contains(&[2, 1, 0]));
        assert!(!s.contains(&[0, 0, 1]));
    }
}
