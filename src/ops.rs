//! Exact operators between typed values: `+`, `-`, `*`, unary `-`, the
//! comparisons, and `+=` / `-=` with a losslessly widening right side.
//!
//! Each result type is computed with `typenum` and checked at compile time
//! against the run-time algebra in [`crate::format`] (the `const` block in
//! every operator), so the type and the [`Format`] never disagree.

use core::cmp::Ordering;
use core::ops::{Add, AddAssign, Mul, Neg, Sub, SubAssign};

use typenum::{Add1, B1, Max, Maximum, Sum, Unsigned};

use crate::format::{Format, FormatError};
use crate::kernel;
use crate::layout::{SignedLayout, UnsignedLayout};
use crate::typed::{QType, Sq, Uq, WidensTo, widen_into};

/// Compile-time check that a type-level result format equals the algebra's.
const fn agrees(typed: Format, algebra: Result<Format, FormatError>) -> bool {
    match algebra {
        Ok(f) => {
            f.is_signed() == typed.is_signed()
                && f.int_bits() == typed.int_bits()
                && f.frac_bits() == typed.frac_bits()
        }
        Err(_) => false,
    }
}

macro_rules! binary_op {
    (
        $Trait:ident, $method:ident, $kernel:ident, $algebra:ident,
        $Lhs:ident < $LI:ident, $LF:ident > : $LL:ident,
        $Rhs:ident < $RI:ident, $RF:ident > : $RL:ident,
        $Out:ident < $OI:ty, $OF:ty > : $OL:ident,
        where { $($bounds:tt)* }
    ) => {
        impl<$LI, $LF, $RI, $RF> $Trait<$Rhs<$RI, $RF>> for $Lhs<$LI, $LF>
        where
            $LI: $LL<$LF>,
            $LF: Unsigned,
            $RI: $RL<$RF>,
            $RF: Unsigned,
            $OI: $OL<$OF>,
            $OF: Unsigned,
            $($bounds)*
        {
            type Output = $Out<$OI, $OF>;

            /// Exact: the result format holds every possible result.
            #[inline(always)]
            fn $method(self, rhs: $Rhs<$RI, $RF>) -> Self::Output {
                const {
                    assert!(
                        agrees(
                            <$Out<$OI, $OF> as QType>::FORMAT,
                            Format::$algebra(<Self as QType>::FORMAT, <$Rhs<$RI, $RF> as QType>::FORMAT)
                        ),
                        "qbound internal error: typed result format disagrees with the format algebra"
                    )
                };
                binary_op!(@body $kernel, self, rhs, $LF, $RF, $Out<$OI, $OF>)
            }
        }
    };
    (@body add, $a:ident, $b:ident, $LF:ident, $RF:ident, $O:ty) => {
        <$O>::from_bits_unchecked(kernel::add($a.to_bits(), $LF::U32, $b.to_bits(), $RF::U32, <$O as QType>::FORMAT))
    };
    (@body sub, $a:ident, $b:ident, $LF:ident, $RF:ident, $O:ty) => {
        <$O>::from_bits_unchecked(kernel::sub($a.to_bits(), $LF::U32, $b.to_bits(), $RF::U32, <$O as QType>::FORMAT))
    };
    (@body mul, $a:ident, $b:ident, $LF:ident, $RF:ident, $O:ty) => {
        <$O>::from_bits_unchecked(kernel::mul($a.to_bits(), $b.to_bits()))
    };
}

// ---- sums and differences ----

macro_rules! add_sub_signed_result {
    ($Trait:ident, $method:ident, $kernel:ident, $algebra:ident, $L:ident : $LL:ident, $R:ident : $RL:ident) => {
        binary_op!(
            $Trait, $method, $kernel, $algebra,
            $L<I1, F1>: $LL,
            $R<I2, F2>: $RL,
            Sq<Add1<Maximum<I1, I2>>, Maximum<F1, F2>>: SignedLayout,
            where {
                I1: Max<I2>,
                F1: Max<F2>,
                Maximum<I1, I2>: Add<B1>,
            }
        );
    };
}

add_sub_signed_result!(Add, add, add, sum, Sq: SignedLayout, Sq: SignedLayout);
add_sub_signed_result!(Add, add, add, sum, Sq: SignedLayout, Uq: UnsignedLayout);
add_sub_signed_result!(Add, add, add, sum, Uq: UnsignedLayout, Sq: SignedLayout);
add_sub_signed_result!(Sub, sub, sub, difference, Sq: SignedLayout, Sq: SignedLayout);
add_sub_signed_result!(Sub, sub, sub, difference, Sq: SignedLayout, Uq: UnsignedLayout);
add_sub_signed_result!(Sub, sub, sub, difference, Uq: UnsignedLayout, Sq: SignedLayout);

binary_op!(
    Add, add, add, sum,
    Uq<I1, F1>: UnsignedLayout,
    Uq<I2, F2>: UnsignedLayout,
    Uq<Add1<Maximum<I1, I2>>, Maximum<F1, F2>>: UnsignedLayout,
    where {
        I1: Max<I2>,
        F1: Max<F2>,
        Maximum<I1, I2>: Add<B1>,
    }
);

binary_op!(
    Sub, sub, sub, difference,
    Uq<I1, F1>: UnsignedLayout,
    Uq<I2, F2>: UnsignedLayout,
    Sq<Maximum<I1, I2>, Maximum<F1, F2>>: SignedLayout,
    where {
        I1: Max<I2>,
        F1: Max<F2>,
    }
);

// ---- products ----

binary_op!(
    Mul, mul, mul, product,
    Sq<I1, F1>: SignedLayout,
    Sq<I2, F2>: SignedLayout,
    Sq<Add1<Sum<I1, I2>>, Sum<F1, F2>>: SignedLayout,
    where {
        I1: Add<I2>,
        F1: Add<F2>,
        Sum<I1, I2>: Add<B1>,
    }
);

macro_rules! mixed_product {
    ($L:ident : $LL:ident, $R:ident : $RL:ident) => {
        binary_op!(
            Mul, mul, mul, product,
            $L<I1, F1>: $LL,
            $R<I2, F2>: $RL,
            Sq<Sum<I1, I2>, Sum<F1, F2>>: SignedLayout,
            where {
                I1: Add<I2>,
                F1: Add<F2>,
            }
        );
    };
}
mixed_product!(Sq: SignedLayout, Uq: UnsignedLayout);
mixed_product!(Uq: UnsignedLayout, Sq: SignedLayout);

binary_op!(
    Mul, mul, mul, product,
    Uq<I1, F1>: UnsignedLayout,
    Uq<I2, F2>: UnsignedLayout,
    Uq<Sum<I1, I2>, Sum<F1, F2>>: UnsignedLayout,
    where {
        I1: Add<I2>,
        F1: Add<F2>,
    }
);

// ---- negation ----

impl<I, F> Neg for Sq<I, F>
where
    I: SignedLayout<F> + Add<B1>,
    F: Unsigned,
    Add1<I>: SignedLayout<F>,
{
    type Output = Sq<Add1<I>, F>;

    /// Exact: `-Q(I, F)` is `Q(I + 1, F)`, so `-MIN` fits.
    #[inline(always)]
    fn neg(self) -> Self::Output {
        const {
            assert!(
                agrees(
                    <Sq<Add1<I>, F> as QType>::FORMAT,
                    Format::negation(<Self as QType>::FORMAT)
                ),
                "qbound internal error: typed result format disagrees with the format algebra"
            )
        };
        Sq::from_bits_unchecked(kernel::neg(self.to_bits()))
    }
}

impl<I, F> Neg for Uq<I, F>
where
    I: UnsignedLayout<F> + SignedLayout<F>,
    F: Unsigned,
{
    type Output = Sq<I, F>;

    /// Exact: `-UQ(I, F)` is `Q(I, F)`.
    #[inline(always)]
    fn neg(self) -> Self::Output {
        const {
            assert!(
                agrees(
                    <Sq<I, F> as QType>::FORMAT,
                    Format::negation(<Self as QType>::FORMAT)
                ),
                "qbound internal error: typed result format disagrees with the format algebra"
            )
        };
        Sq::from_bits_unchecked(kernel::neg(self.to_bits()))
    }
}

// ---- comparisons across formats ----

macro_rules! compare {
    ($L:ident : $LL:ident, $R:ident : $RL:ident) => {
        impl<I1, F1, I2, F2> PartialEq<$R<I2, F2>> for $L<I1, F1>
        where
            I1: $LL<F1>,
            F1: Unsigned,
            I2: $RL<F2>,
            F2: Unsigned,
        {
            /// Exact comparison of the values, whatever the formats.
            #[inline(always)]
            fn eq(&self, other: &$R<I2, F2>) -> bool {
                kernel::cmp(self.to_bits(), F1::U32, other.to_bits(), F2::U32) == Ordering::Equal
            }
        }

        impl<I1, F1, I2, F2> PartialOrd<$R<I2, F2>> for $L<I1, F1>
        where
            I1: $LL<F1>,
            F1: Unsigned,
            I2: $RL<F2>,
            F2: Unsigned,
        {
            /// Exact comparison of the values, whatever the formats.
            #[inline(always)]
            fn partial_cmp(&self, other: &$R<I2, F2>) -> Option<Ordering> {
                Some(kernel::cmp(
                    self.to_bits(),
                    F1::U32,
                    other.to_bits(),
                    F2::U32,
                ))
            }
        }
    };
}
compare!(Sq: SignedLayout, Sq: SignedLayout);
compare!(Sq: SignedLayout, Uq: UnsignedLayout);
compare!(Uq: UnsignedLayout, Sq: SignedLayout);
compare!(Uq: UnsignedLayout, Uq: UnsignedLayout);

// ---- += and -= ----

macro_rules! assign_ops {
    ($T:ident : $L:ident) => {
        impl<I, F, R> AddAssign<R> for $T<I, F>
        where
            I: $L<F>,
            F: Unsigned,
            R: WidensTo<$T<I, F>>,
        {
            /// Adds a value that widens losslessly into this format.
            ///
            /// Overflow behaves as for Rust's integers: a panic when
            /// qbound is built with debug assertions, wrap-around
            /// otherwise. Use `wrapping_add`, `saturating_add` or
            /// `checked_add` to choose explicitly.
            #[inline(always)]
            #[track_caller]
            fn add_assign(&mut self, rhs: R) {
                let rhs: Self = widen_into(rhs);
                let f = kernel::add_same(self.to_bits(), rhs.to_bits(), Self::FORMAT);
                if cfg!(debug_assertions) && f.side.is_some() {
                    panic!("qbound: attempt to add with overflow in {}", Self::FORMAT);
                }
                *self = Self::from_bits_unchecked(f.wrapped);
            }
        }

        impl<I, F, R> SubAssign<R> for $T<I, F>
        where
            I: $L<F>,
            F: Unsigned,
            R: WidensTo<$T<I, F>>,
        {
            /// Subtracts a value that widens losslessly into this format.
            ///
            /// Overflow behaves as for Rust's integers: a panic when
            /// qbound is built with debug assertions, wrap-around
            /// otherwise.
            #[inline(always)]
            #[track_caller]
            fn sub_assign(&mut self, rhs: R) {
                let rhs: Self = widen_into(rhs);
                let f = kernel::sub_same(self.to_bits(), rhs.to_bits(), Self::FORMAT);
                if cfg!(debug_assertions) && f.side.is_some() {
                    panic!(
                        "qbound: attempt to subtract with overflow in {}",
                        Self::FORMAT
                    );
                }
                *self = Self::from_bits_unchecked(f.wrapped);
            }
        }
    };
}
assign_ops!(Sq: SignedLayout);
assign_ops!(Uq: UnsignedLayout);
