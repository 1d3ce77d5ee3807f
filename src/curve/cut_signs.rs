//! The signs of crossing a cut: a wall's multiplicity changes by
//! eps(i) eps(j) where it crosses a cut, and the cut's own matrix carries
//! the same eps (see network/jump.rs for the conventions). They depend on
//! the cut's permutation only, so they live with the curve's cuts.

/// The inverse of a permutation given as `perm[a] = image of a`.
pub fn invert(perm: &[usize]) -> Vec<usize> {
    let mut inv = vec![0; perm.len()];
    for (a, &p) in perm.iter().enumerate() {
        inv[p] = a;
    }
    inv
}

/// Signs by which a wall's multiplicity changes when it crosses a cut with
/// permutation `perm` (west to east), per label before the crossing.
pub fn cut_signs(perm: &[usize], west_to_east: bool) -> Vec<i64> {
    let eps = cycle_signs(perm);
    if west_to_east {
        eps
    } else {
        let inv = invert(perm);
        (0..perm.len()).map(|x| eps[inv[x]]).collect()
    }
}

/// eps(x) = -1 for the smallest label of each cycle of even length.
pub(crate) fn cycle_signs(perm: &[usize]) -> Vec<i64> {
    let n = perm.len();
    let mut eps = vec![1_i64; n];
    let mut seen = vec![false; n];
    for start in 0..n {
        if seen[start] {
            continue;
        }
        let mut cycle = vec![start];
        seen[start] = true;
        let mut x = perm[start];
        let mut guard = 0;
        while x != start && guard < n {
            seen[x] = true;
            cycle.push(x);
            x = perm[x];
            guard += 1;
        }
        // The signs of a cycle multiply to (-1)^(p-1), the sign the
        // normalisation (dP/dy)^(-1/2) of local solutions picks up going p
        // times round a point where p sheets meet like (z - b)^(1/p); it
        // is also what makes det C = 1, without which no product of
        // unipotent wall factors could close a loop with C.
        if cycle.len() % 2 == 0 {
            let min = *cycle.iter().min().expect("non-empty cycle");
            eps[min] = -1;
        }
    }
    eps
}
