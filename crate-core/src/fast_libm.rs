//! `pow` and `hypot`: bit for bit the `libm` functions, with their square roots taken by
//! `f64::sqrt` instead of libm's software square root.
//!
//! IEEE 754 requires square root to be correctly rounded, so the hardware instruction (x86
//! `sqrtsd`, wasm `f64.sqrt`) gives the very same bits as libm's software root, which libm
//! uses on wasm32 (stable Rust) and which made growth there about a fifth slower and drawing
//! a network's geometry a quarter slower.
//!
//! - `libm::pow(x, 0.5)` returns `sqrt(x)` for every `x` with its sign bit clear (musl's rule,
//!   which libm follows); other cases go to `libm::pow`.
//! - `hypot` is libm's (musl's) algorithm line for line: the sum of squares split into high
//!   and low parts, rescaled away from overflow and underflow, then one square root.

/// `x` raised to `y`, bit for bit equal to `libm::pow(x, y)`.
#[inline]
pub fn pow(x: f64, y: f64) -> f64 {
    if y == 0.5 && x.is_sign_positive() {
        x.sqrt()
    } else {
        libm::pow(x, y)
    }
}

/// `sqrt(x^2 + y^2)` without undue overflow or underflow, bit for bit `libm::hypot(x, y)`.
#[inline]
pub fn hypot(x: f64, y: f64) -> f64 {
    let two_700 = f64::from_bits(0x6bb0_0000_0000_0000);
    let two_minus_700 = f64::from_bits(0x1430_0000_0000_0000);
    // Arrange |x| >= |y|.
    let (mut big, mut small) = (x.to_bits() & (u64::MAX >> 1), y.to_bits() & (u64::MAX >> 1));
    if big < small {
        std::mem::swap(&mut big, &mut small);
    }
    let exponent_big = (big >> 52) as i64;
    let exponent_small = (small >> 52) as i64;
    let mut x = f64::from_bits(big);
    let mut y = f64::from_bits(small);
    // hypot(inf, nan) is inf.
    if exponent_small == 0x7ff {
        return y;
    }
    if exponent_big == 0x7ff || small == 0 {
        return x;
    }
    if exponent_big - exponent_small > 64 {
        return x + y;
    }
    let mut scale = 1.0;
    if exponent_big > 0x3ff + 510 {
        scale = two_700;
        x *= two_minus_700;
        y *= two_minus_700;
    } else if exponent_small < 0x3ff - 450 {
        scale = two_minus_700;
        x *= two_700;
        y *= two_700;
    }
    let (high_x, low_x) = split_square(x);
    let (high_y, low_y) = split_square(y);
    scale * (low_y + low_x + high_y + high_x).sqrt()
}

/// `x * x` as a high part and the rounding error as a low part (Dekker's splitting).
fn split_square(x: f64) -> (f64, f64) {
    const SPLIT: f64 = 134_217_728.0 + 1.0; // 2^27 + 1
    let scaled = x * SPLIT;
    let high_half = x - scaled + scaled;
    let low_half = x - high_half;
    let high = x * x;
    let low = high_half * high_half - high + 2.0 * high_half * low_half + low_half * low_half;
    (high, low)
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Equal to libm's bits on ordinary, tiny, huge, subnormal and special inputs.
    #[test]
    fn hypot_matches_libm_bit_for_bit() {
        let mut values = vec![
            0.0,
            -0.0,
            1.0,
            -3.0,
            4.0,
            5e-324,
            1e-310,
            1e300,
            1.7e308,
            f64::INFINITY,
            f64::NEG_INFINITY,
            f64::NAN,
            0.1,
            0.15,
            2.0f64.sqrt(),
        ];
        let mut state = 0x9e37_79b9_7f4a_7c15u64;
        for _ in 0..3000 {
            state = state
                .wrapping_mul(6_364_136_223_846_793_005)
                .wrapping_add(1_442_695_040_888_963_407);
            let bits = state;
            let value = f64::from_bits(bits);
            if value.is_finite() {
                values.push(value);
            }
            values.push((state >> 11) as f64 / (1u64 << 40) as f64 - 4096.0);
        }
        for (index, &x) in values.iter().enumerate() {
            for &y in values.iter().skip(index % 7).step_by(37) {
                assert_eq!(
                    hypot(x, y).to_bits(),
                    libm::hypot(x, y).to_bits(),
                    "hypot({x:e}, {y:e})"
                );
            }
        }
    }

    /// Equal to libm's bits on awkward and ordinary inputs alike.
    #[test]
    fn square_root_case_matches_libm_bit_for_bit() {
        let mut x = 1.0e-300f64;
        let mut inputs = vec![
            0.0,
            -0.0,
            1.0,
            2.0,
            3.0,
            f64::INFINITY,
            f64::NAN,
            -4.0,
            5e-324,
        ];
        while x < 1.0e300 {
            inputs.push(x);
            x *= 1.37;
        }
        for input in inputs {
            for exponent in [0.5, 0.25, 1.0 / 3.0, 2.0] {
                assert_eq!(
                    pow(input, exponent).to_bits(),
                    libm::pow(input, exponent).to_bits(),
                    "pow({input}, {exponent})"
                );
            }
        }
    }
}
