//! `DesignStorm`: the design rainfall intensity, either one constant or an intensity-duration
//! relation `i = a / (t + b)^c` (t in minutes), always given by the user from local records:
//! there is deliberately no default intensity and no default coefficients.

use serde::{Deserialize, Serialize};

use super::units::UnitSystem;
use super::DrainageError;

/// The design rainfall, in the intensity unit of `unit` (mm/h or in/h). It must come from
/// local rainfall records for the chosen return period; nothing here guesses it.
#[derive(Clone, Copy, Debug, PartialEq, Serialize, Deserialize)]
#[serde(tag = "kind", rename_all = "snake_case")]
pub enum DesignStorm {
    /// One intensity whatever the time of concentration.
    Constant {
        /// Intensity, mm/h or in/h.
        intensity: f64,
        /// Unit system of `intensity`.
        unit: UnitSystem,
    },
    /// `i = a / (t + b)^c`, t the duration (time of concentration) in minutes.
    IntensityDuration {
        /// Numerator, giving i in mm/h or in/h.
        a: f64,
        /// Added to the duration, minutes.
        b: f64,
        /// Exponent (dimensionless).
        c: f64,
        /// Unit system of the intensities the relation gives.
        unit: UnitSystem,
    },
}

impl DesignStorm {
    /// Checks the values themselves: a finite, positive constant intensity; finite
    /// coefficients with `a > 0`. Durations are checked when the intensity is read.
    pub fn validate(&self) -> Result<(), DrainageError> {
        match *self {
            DesignStorm::Constant { intensity, .. } => {
                if !(intensity.is_finite() && intensity > 0.0) {
                    return Err(DrainageError::Intensity { value: intensity });
                }
            }
            DesignStorm::IntensityDuration { a, b, c, .. } => {
                if !(a.is_finite() && a > 0.0) {
                    return Err(DrainageError::StormCoefficient {
                        name: "a",
                        value: a,
                    });
                }
                if !b.is_finite() {
                    return Err(DrainageError::StormCoefficient {
                        name: "b",
                        value: b,
                    });
                }
                if !c.is_finite() {
                    return Err(DrainageError::StormCoefficient {
                        name: "c",
                        value: c,
                    });
                }
            }
        }
        Ok(())
    }

    /// The intensity in mm/h for a duration in minutes; an error naming the duration and the
    /// value when the relation gives no finite, positive intensity there.
    pub fn intensity_mm_per_hour(&self, duration_minutes: f64) -> Result<f64, DrainageError> {
        self.validate()?;
        let (intensity, unit) = match *self {
            DesignStorm::Constant { intensity, unit } => (intensity, unit),
            DesignStorm::IntensityDuration { a, b, c, unit } => {
                let base = duration_minutes + b;
                let value = if base > 0.0 {
                    a / base.powf(c)
                } else {
                    f64::NAN
                };
                (value, unit)
            }
        };
        // Checked after conversion too: 1e307 in/h is finite but not in mm/h.
        let si = unit.intensity_to_si(intensity);
        if !(intensity.is_finite() && intensity > 0.0 && si.is_finite() && si > 0.0) {
            return Err(DrainageError::IntensityAtDuration {
                duration_minutes,
                value: intensity,
            });
        }
        Ok(si)
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn relation_gives_the_hand_computed_intensity() {
        // Hand arithmetic: a = 1500, b = 10, c = 0.8 (mm/h), t = 15 min:
        // 25^0.8 = e^(0.8 ln 25) = e^2.575101 = 13.1326, i = 1500 / 13.1326 = 114.22 mm/h.
        let storm = DesignStorm::IntensityDuration {
            a: 1500.0,
            b: 10.0,
            c: 0.8,
            unit: UnitSystem::Si,
        };
        let i = storm.intensity_mm_per_hour(15.0).unwrap();
        assert!((i - 114.22).abs() < 0.01, "{i}");
        // In in/h: a = 60 in/h, b = 10, c = 1, t = 20: i = 2 in/h = 50.8 mm/h.
        let us = DesignStorm::IntensityDuration {
            a: 60.0,
            b: 10.0,
            c: 1.0,
            unit: UnitSystem::Us,
        };
        assert!((us.intensity_mm_per_hour(20.0).unwrap() - 50.8).abs() < 1e-9);
    }

    #[test]
    fn bad_storms_are_named() {
        let zero = DesignStorm::Constant {
            intensity: 0.0,
            unit: UnitSystem::Si,
        };
        assert!(zero
            .validate()
            .unwrap_err()
            .to_string()
            .contains("intensity 0"));
        let nan = DesignStorm::Constant {
            intensity: f64::NAN,
            unit: UnitSystem::Si,
        };
        assert!(nan.validate().unwrap_err().to_string().contains("NaN"));
        let negative_a = DesignStorm::IntensityDuration {
            a: -5.0,
            b: 10.0,
            c: 0.8,
            unit: UnitSystem::Si,
        };
        let message = negative_a.validate().unwrap_err().to_string();
        assert!(
            message.contains("coefficient a") && message.contains("-5"),
            "{message}"
        );
        // b = -20 makes t + b negative at t = 10 minutes: no intensity there.
        let negative_base = DesignStorm::IntensityDuration {
            a: 1500.0,
            b: -20.0,
            c: 0.8,
            unit: UnitSystem::Si,
        };
        let message = negative_base
            .intensity_mm_per_hour(10.0)
            .unwrap_err()
            .to_string();
        assert!(message.contains("10 min"), "{message}");
    }
}
