//! Number sequences of well diffusers (Schroeder 1975; Cox & D'Antonio,
//! Acoustic Absorbers and Diffusers, ch. 10): quadratic residue and primitive
//! root sequences, and the well depths they give at a design frequency.

/// True when `n` is prime (trial division; sequences use small primes).
#[must_use]
pub fn is_prime(n: u32) -> bool {
    if n < 2 {
        return false;
    }
    let mut d = 2u32;
    while u64::from(d) * u64::from(d) <= u64::from(n) {
        if n.is_multiple_of(d) {
            return false;
        }
        d += 1;
    }
    true
}

/// True when `g` is a primitive root of the prime `p`: its powers g^1..g^(p−1)
/// mod p run through every value 1..p−1.
#[must_use]
pub fn is_primitive_root(g: u32, p: u32) -> bool {
    if p < 2 || g.is_multiple_of(p) {
        return false;
    }
    let mut seen = vec![false; p as usize];
    let mut v = 1u64;
    for _ in 1..p {
        v = v * u64::from(g) % u64::from(p);
        if seen[v as usize] {
            return false;
        }
        seen[v as usize] = true;
    }
    true
}

/// The smallest primitive root of the prime `p`, if any.
#[must_use]
pub fn smallest_primitive_root(p: u32) -> Option<u32> {
    (2..p).find(|&g| is_primitive_root(g, p))
}

/// Quadratic residue sequence s_n = n² mod N, n = 0..N−1.
#[must_use]
pub fn quadratic_residue(prime: u32) -> Vec<u32> {
    (0..u64::from(prime))
        .map(|n| (n * n % u64::from(prime)) as u32)
        .collect()
}

/// Primitive root sequence s_n = g^n mod N, n = 1..N−1.
#[must_use]
pub fn primitive_root(prime: u32, root: u32) -> Vec<u32> {
    let mut v = 1u64;
    (1..prime)
        .map(|_| {
            v = v * u64::from(root) % u64::from(prime);
            v as u32
        })
        .collect()
}

/// Well depths d_n = s_n λ0 / (2N), m, for design frequency `design_hz`
/// (Cox & D'Antonio): at f0 the wells' reflection factors e^{−2jk d_n} are
/// e^{−2πj s_n / N}.
#[must_use]
pub fn depths_m(sequence: &[u32], prime: u32, design_hz: f64, sound_speed_m_s: f64) -> Vec<f64> {
    let lambda0 = sound_speed_m_s / design_hz;
    sequence
        .iter()
        .map(|&s| f64::from(s) * lambda0 / (2.0 * f64::from(prime)))
        .collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn sequences_match_textbook_values() {
        // N = 7 quadratic residues 0,1,4,2,2,4,1 (reference.md §7; Cox & D'Antonio).
        assert_eq!(quadratic_residue(7), vec![0, 1, 4, 2, 2, 4, 1]);
        // 3 is the smallest primitive root of 7; powers 3,2,6,4,5,1 (elementary number theory).
        assert_eq!(smallest_primitive_root(7), Some(3));
        assert_eq!(primitive_root(7, 3), vec![3, 2, 6, 4, 5, 1]);
        assert!(!is_primitive_root(2, 7)); // 2³ = 8 ≡ 1 mod 7
        assert!(is_prime(11) && !is_prime(9) && !is_prime(1));
    }
}
