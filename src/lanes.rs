//! Four f32 lanes and two f64 lanes: SSE and SSE2 on x86_64 (part of its
//! baseline), plain arrays elsewhere. Only what the slab and triangle tests
//! need; both versions give the same results lane by lane (IEEE arithmetic,
//! the same operand order in min and max, so NaN handling agrees too), and
//! the same results as scalar code doing the same operations.

#[cfg(target_arch = "x86_64")]
mod imp {
    use std::arch::x86_64::*;

    /// Four f32 values.
    #[derive(Clone, Copy)]
    pub(crate) struct F4(__m128);

    // SAFETY (all functions): SSE and SSE2 are part of the x86_64 baseline,
    // so the intrinsics are always available; loads read one whole,
    // 16-byte aligned `[f32; 4]`.
    impl F4 {
        #[inline(always)]
        pub(crate) fn splat(x: f32) -> Self {
            Self(unsafe { _mm_set1_ps(x) })
        }
        #[inline(always)]
        pub(crate) fn load(row: &[f32; 4]) -> Self {
            debug_assert!((row.as_ptr() as usize).is_multiple_of(16));
            Self(unsafe { _mm_load_ps(row.as_ptr()) })
        }
        #[inline(always)]
        pub(crate) fn add(self, o: Self) -> Self {
            Self(unsafe { _mm_add_ps(self.0, o.0) })
        }
        #[inline(always)]
        pub(crate) fn sub(self, o: Self) -> Self {
            Self(unsafe { _mm_sub_ps(self.0, o.0) })
        }
        #[inline(always)]
        pub(crate) fn mul(self, o: Self) -> Self {
            Self(unsafe { _mm_mul_ps(self.0, o.0) })
        }
        /// Lane-wise `if self < o { self } else { o }`.
        #[inline(always)]
        pub(crate) fn min(self, o: Self) -> Self {
            Self(unsafe { _mm_min_ps(self.0, o.0) })
        }
        /// Lane-wise `if self > o { self } else { o }`.
        #[inline(always)]
        pub(crate) fn max(self, o: Self) -> Self {
            Self(unsafe { _mm_max_ps(self.0, o.0) })
        }
        /// Bit i set where lane i of `self` ≤ lane i of `o`.
        #[inline(always)]
        pub(crate) fn le_mask(self, o: Self) -> u32 {
            unsafe { _mm_movemask_ps(_mm_cmple_ps(self.0, o.0)) as u32 }
        }
        /// Bit i set where lane i of `self` < lane i of `o`.
        #[inline(always)]
        pub(crate) fn lt_mask(self, o: Self) -> u32 {
            unsafe { _mm_movemask_ps(_mm_cmplt_ps(self.0, o.0)) as u32 }
        }
        #[inline(always)]
        pub(crate) fn to_array(self) -> [f32; 4] {
            let mut out = [0.0f32; 4];
            unsafe { _mm_storeu_ps(out.as_mut_ptr(), self.0) };
            out
        }
    }

    /// Two f64 values.
    #[derive(Clone, Copy)]
    pub(crate) struct F2(__m128d);

    // SAFETY (all functions): as for `F4`; loads read one 16-byte aligned `[f64; 2]`.
    impl F2 {
        #[inline(always)]
        pub(crate) fn splat(x: f64) -> Self {
            Self(unsafe { _mm_set1_pd(x) })
        }
        #[inline(always)]
        pub(crate) fn load(pair: &[f64; 2]) -> Self {
            debug_assert!((pair.as_ptr() as usize).is_multiple_of(16));
            Self(unsafe { _mm_load_pd(pair.as_ptr()) })
        }
        #[inline(always)]
        pub(crate) fn add(self, o: Self) -> Self {
            Self(unsafe { _mm_add_pd(self.0, o.0) })
        }
        #[inline(always)]
        pub(crate) fn sub(self, o: Self) -> Self {
            Self(unsafe { _mm_sub_pd(self.0, o.0) })
        }
        #[inline(always)]
        pub(crate) fn mul(self, o: Self) -> Self {
            Self(unsafe { _mm_mul_pd(self.0, o.0) })
        }
        #[inline(always)]
        pub(crate) fn div(self, o: Self) -> Self {
            Self(unsafe { _mm_div_pd(self.0, o.0) })
        }
        /// Bit i set where lane i of `self` < lane i of `o`.
        #[inline(always)]
        pub(crate) fn lt_mask(self, o: Self) -> u32 {
            unsafe { _mm_movemask_pd(_mm_cmplt_pd(self.0, o.0)) as u32 }
        }
        /// Bit i set where lane i of `self` ≠ lane i of `o` (or either is NaN).
        #[inline(always)]
        pub(crate) fn ne_mask(self, o: Self) -> u32 {
            unsafe { _mm_movemask_pd(_mm_cmpneq_pd(self.0, o.0)) as u32 }
        }
        #[inline(always)]
        pub(crate) fn to_array(self) -> [f64; 2] {
            let mut out = [0.0f64; 2];
            unsafe { _mm_storeu_pd(out.as_mut_ptr(), self.0) };
            out
        }
        /// Lane-wise `if self < o { self } else { o }`.
        #[inline(always)]
        pub(crate) fn min(self, o: Self) -> Self {
            Self(unsafe { _mm_min_pd(self.0, o.0) })
        }
        /// Lane-wise `if self > o { self } else { o }`.
        #[inline(always)]
        pub(crate) fn max(self, o: Self) -> Self {
            Self(unsafe { _mm_max_pd(self.0, o.0) })
        }
        /// Lanes truncated toward zero to i32; NaN and values outside the
        /// i32 range give `i32::MIN`.
        #[inline(always)]
        pub(crate) fn to_i32(self) -> [i32; 2] {
            let v = unsafe { _mm_cvttpd_epi32(self.0) };
            unsafe {
                [
                    _mm_cvtsi128_si32(v),
                    _mm_cvtsi128_si32(_mm_shuffle_epi32::<1>(v)),
                ]
            }
        }
    }
}

#[cfg(not(target_arch = "x86_64"))]
mod imp {
    /// Four f32 values.
    #[derive(Clone, Copy)]
    pub(crate) struct F4([f32; 4]);

    impl F4 {
        #[inline(always)]
        pub(crate) fn splat(x: f32) -> Self {
            Self([x; 4])
        }
        #[inline(always)]
        pub(crate) fn load(row: &[f32; 4]) -> Self {
            Self(*row)
        }
        #[inline(always)]
        pub(crate) fn add(self, o: Self) -> Self {
            Self(std::array::from_fn(|i| self.0[i] + o.0[i]))
        }
        #[inline(always)]
        pub(crate) fn sub(self, o: Self) -> Self {
            Self(std::array::from_fn(|i| self.0[i] - o.0[i]))
        }
        #[inline(always)]
        pub(crate) fn mul(self, o: Self) -> Self {
            Self(std::array::from_fn(|i| self.0[i] * o.0[i]))
        }
        #[inline(always)]
        pub(crate) fn min(self, o: Self) -> Self {
            Self(std::array::from_fn(|i| {
                if self.0[i] < o.0[i] {
                    self.0[i]
                } else {
                    o.0[i]
                }
            }))
        }
        #[inline(always)]
        pub(crate) fn max(self, o: Self) -> Self {
            Self(std::array::from_fn(|i| {
                if self.0[i] > o.0[i] {
                    self.0[i]
                } else {
                    o.0[i]
                }
            }))
        }
        #[inline(always)]
        pub(crate) fn le_mask(self, o: Self) -> u32 {
            (0..4).fold(0, |m, i| m | (u32::from(self.0[i] <= o.0[i]) << i))
        }
        #[inline(always)]
        pub(crate) fn lt_mask(self, o: Self) -> u32 {
            (0..4).fold(0, |m, i| m | (u32::from(self.0[i] < o.0[i]) << i))
        }
        #[inline(always)]
        pub(crate) fn to_array(self) -> [f32; 4] {
            self.0
        }
    }

    /// Two f64 values.
    #[derive(Clone, Copy)]
    pub(crate) struct F2([f64; 2]);

    impl F2 {
        #[inline(always)]
        pub(crate) fn splat(x: f64) -> Self {
            Self([x; 2])
        }
        #[inline(always)]
        pub(crate) fn load(pair: &[f64; 2]) -> Self {
            Self(*pair)
        }
        #[inline(always)]
        pub(crate) fn add(self, o: Self) -> Self {
            Self([self.0[0] + o.0[0], self.0[1] + o.0[1]])
        }
        #[inline(always)]
        pub(crate) fn sub(self, o: Self) -> Self {
            Self([self.0[0] - o.0[0], self.0[1] - o.0[1]])
        }
        #[inline(always)]
        pub(crate) fn mul(self, o: Self) -> Self {
            Self([self.0[0] * o.0[0], self.0[1] * o.0[1]])
        }
        #[inline(always)]
        pub(crate) fn div(self, o: Self) -> Self {
            Self([self.0[0] / o.0[0], self.0[1] / o.0[1]])
        }
        #[inline(always)]
        pub(crate) fn lt_mask(self, o: Self) -> u32 {
            u32::from(self.0[0] < o.0[0]) | (u32::from(self.0[1] < o.0[1]) << 1)
        }
        #[inline(always)]
        pub(crate) fn ne_mask(self, o: Self) -> u32 {
            u32::from(self.0[0] != o.0[0]) | (u32::from(self.0[1] != o.0[1]) << 1)
        }
        #[inline(always)]
        pub(crate) fn to_array(self) -> [f64; 2] {
            self.0
        }
        #[inline(always)]
        pub(crate) fn min(self, o: Self) -> Self {
            let m = |a: f64, b: f64| if a < b { a } else { b };
            Self([m(self.0[0], o.0[0]), m(self.0[1], o.0[1])])
        }
        #[inline(always)]
        pub(crate) fn max(self, o: Self) -> Self {
            let m = |a: f64, b: f64| if a > b { a } else { b };
            Self([m(self.0[0], o.0[0]), m(self.0[1], o.0[1])])
        }
        #[inline(always)]
        pub(crate) fn to_i32(self) -> [i32; 2] {
            self.0.map(|x| {
                if x > -2147483649.0 && x < 2147483648.0 {
                    x as i32
                } else {
                    i32::MIN
                }
            })
        }
    }
}

pub(crate) use imp::{F2, F4};
