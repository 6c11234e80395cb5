//! `pow`: `libm::pow` with its square-root case (`y = 0.5`) taken by `f64::sqrt`.
//!
//! `libm::pow(x, 0.5)` returns `sqrt(x)` for every `x` with its sign bit clear (musl's rule,
//! which libm follows). IEEE 754 requires square root to be correctly rounded, so the hardware
//! instruction (x86 `sqrtsd`, wasm `f64.sqrt`) gives the very same bits as libm's software
//! square root, which libm uses on wasm32 and which made growth there about a fifth slower.

/// `x` raised to `y`, bit for bit equal to `libm::pow(x, y)`.
#[inline]
pub fn pow(x: f64, y: f64) -> f64 {
    if y == 0.5 && x.is_sign_positive() {
        x.sqrt()
    } else {
        libm::pow(x, y)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

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
