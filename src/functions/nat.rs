//! A small fixed-size unsigned integer for the rare slow paths of division
//! and square root (operands of 128-bit formats, stochastic rounding): the
//! exact quotient or root of numbers up to 640 bits, bit by bit.
//!
//! Bit-serial restoring division and the digit-by-digit square root are
//! slow (hundreds of steps) but simple enough to check by eye; the fast
//! paths on native integers handle everything up to 64-bit formats.

use core::cmp::Ordering;

const LIMBS: usize = 10;

/// An unsigned integer of 640 bits, little-endian 64-bit limbs.
#[derive(Clone, Copy, PartialEq, Eq, Debug)]
pub(crate) struct Nat {
    limbs: [u64; LIMBS],
}

impl Nat {
    pub const ZERO: Nat = Nat { limbs: [0; LIMBS] };

    pub fn from_u128(v: u128) -> Nat {
        let mut n = Nat::ZERO;
        n.limbs[0] = v as u64;
        n.limbs[1] = (v >> 64) as u64;
        n
    }

    /// From little-endian 64-bit limbs (at most 10).
    pub fn from_limbs(l: &[u64]) -> Nat {
        let mut n = Nat::ZERO;
        n.limbs[..l.len()].copy_from_slice(l);
        n
    }

    pub fn is_zero(&self) -> bool {
        self.limbs.iter().all(|&l| l == 0)
    }

    /// Number of significant bits (0 for zero).
    pub fn bit_len(&self) -> u32 {
        for i in (0..LIMBS).rev() {
            if self.limbs[i] != 0 {
                return i as u32 * 64 + 64 - self.limbs[i].leading_zeros();
            }
        }
        0
    }

    pub fn bit(&self, i: u32) -> bool {
        let (l, b) = ((i / 64) as usize, i % 64);
        l < LIMBS && (self.limbs[l] >> b) & 1 == 1
    }

    pub fn set_bit(&mut self, i: u32) {
        let (l, b) = ((i / 64) as usize, i % 64);
        self.limbs[l] |= 1 << b;
    }

    /// The low 128 bits.
    pub fn low_u128(&self) -> u128 {
        self.limbs[0] as u128 | (self.limbs[1] as u128) << 64
    }

    /// `self * 2^k`; bits beyond 640 are lost (callers stay below).
    pub fn shl(&self, k: u32) -> Nat {
        let (w, b) = ((k / 64) as usize, k % 64);
        let mut out = Nat::ZERO;
        for i in (w..LIMBS).rev() {
            let src = i - w;
            let mut v = self.limbs[src] << b;
            if b != 0 && src > 0 {
                v |= self.limbs[src - 1] >> (64 - b);
            }
            out.limbs[i] = v;
        }
        out
    }

    /// `floor(self / 2^k)`.
    pub fn shr(&self, k: u32) -> Nat {
        let (w, b) = ((k / 64) as usize, k % 64);
        let mut out = Nat::ZERO;
        for i in 0..LIMBS {
            let src = i + w;
            if src >= LIMBS {
                break;
            }
            let mut v = self.limbs[src] >> b;
            if b != 0 && src + 1 < LIMBS {
                v |= self.limbs[src + 1] << (64 - b);
            }
            out.limbs[i] = v;
        }
        out
    }

    pub fn add(&self, o: &Nat) -> Nat {
        let mut out = Nat::ZERO;
        let mut carry = false;
        for i in 0..LIMBS {
            let (s1, c1) = self.limbs[i].overflowing_add(o.limbs[i]);
            let (s2, c2) = s1.overflowing_add(carry as u64);
            out.limbs[i] = s2;
            carry = c1 || c2;
        }
        out
    }

    /// `self - o` for `self >= o`.
    pub fn sub(&self, o: &Nat) -> Nat {
        let mut out = Nat::ZERO;
        let mut borrow = false;
        for i in 0..LIMBS {
            let (s1, b1) = self.limbs[i].overflowing_sub(o.limbs[i]);
            let (s2, b2) = s1.overflowing_sub(borrow as u64);
            out.limbs[i] = s2;
            borrow = b1 || b2;
        }
        out
    }

    /// `self * m` (the product must fit 640 bits).
    pub fn mul_u128(&self, m: u128) -> Nat {
        let (m0, m1) = (m as u64, (m >> 64) as u64);
        let part = |x: u64| {
            let mut out = Nat::ZERO;
            let mut carry = 0u128;
            for i in 0..LIMBS {
                let t = self.limbs[i] as u128 * x as u128 + carry;
                out.limbs[i] = t as u64;
                carry = t >> 64;
            }
            out
        };
        part(m0).add(&part(m1).shl(64))
    }
}

impl PartialOrd for Nat {
    fn partial_cmp(&self, other: &Nat) -> Option<Ordering> {
        Some(self.cmp(other))
    }
}

impl Ord for Nat {
    fn cmp(&self, other: &Nat) -> Ordering {
        for i in (0..LIMBS).rev() {
            match self.limbs[i].cmp(&other.limbs[i]) {
                Ordering::Equal => {}
                o => return o,
            }
        }
        Ordering::Equal
    }
}

/// `(floor(n / d), n mod d)` for `d != 0`, by restoring division.
pub(crate) fn div_rem(n: &Nat, d: &Nat) -> (Nat, Nat) {
    let mut q = Nat::ZERO;
    let mut r = Nat::ZERO;
    for i in (0..n.bit_len()).rev() {
        r = r.shl(1);
        if n.bit(i) {
            r.limbs[0] |= 1;
        }
        if r >= *d {
            r = r.sub(d);
            q.set_bit(i);
        }
    }
    (q, r)
}

/// `(floor(sqrt(n)), n - floor(sqrt(n))^2)`, digit by digit in base 4.
pub(crate) fn isqrt_rem(n: &Nat) -> (Nat, Nat) {
    let mut x = *n;
    let mut res = Nat::ZERO;
    if n.is_zero() {
        return (res, x);
    }
    let mut pos = (n.bit_len() - 1) & !1;
    loop {
        let mut bit = Nat::ZERO;
        bit.set_bit(pos);
        let trial = res.add(&bit);
        if x >= trial {
            x = x.sub(&trial);
            res = res.shr(1).add(&bit);
        } else {
            res = res.shr(1);
        }
        if pos == 0 {
            break;
        }
        pos -= 2;
    }
    (res, x)
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn small_cases() {
        let (q, r) = div_rem(&Nat::from_u128(1000), &Nat::from_u128(7));
        assert_eq!((q.low_u128(), r.low_u128()), (142, 6));
        let (s, r) = isqrt_rem(&Nat::from_u128(1000));
        assert_eq!((s.low_u128(), r.low_u128()), (31, 39));
        let big = Nat::from_u128(u128::MAX).shl(300);
        let (q, r) = div_rem(&big, &Nat::from_u128(u128::MAX));
        assert_eq!(q, Nat::from_u128(1).shl(300));
        assert!(r.is_zero());
        let (s, r) = isqrt_rem(&Nat::from_u128(1).shl(400));
        assert_eq!(s, Nat::from_u128(1).shl(200));
        assert!(r.is_zero());
        assert_eq!(
            Nat::from_u128(3).mul_u128(u128::MAX).shr(2).low_u128(),
            u128::MAX - (u128::MAX >> 2) - 1
        );
    }
}
