//! `UnitSystem`: the SI and US customary units drainage figures are reported in, and the exact
//! conversions between them (1 ft = 0.3048 m, 1 in = 25.4 mm, 1 acre = 43,560 ft^2,
//! 1 ha = 10,000 m^2). Every computation runs in SI; these only translate at the edges.

use serde::{Deserialize, Serialize};

use super::DrainageError;

/// Metres in one international foot (exact by definition, 1959 international yard and pound
/// agreement).
pub const METRES_PER_FOOT: f64 = 0.3048;
/// Millimetres in one inch (exact by definition).
pub const MILLIMETRES_PER_INCH: f64 = 25.4;
/// Square feet in one acre (exact by definition).
pub const SQUARE_FEET_PER_ACRE: f64 = 43_560.0;
/// Square metres in one hectare (exact by definition).
pub const SQUARE_METRES_PER_HECTARE: f64 = 10_000.0;

/// The units drainage figures are given and reported in.
#[derive(Clone, Copy, Debug, Default, PartialEq, Eq, Serialize, Deserialize)]
#[serde(rename_all = "lowercase")]
pub enum UnitSystem {
    /// Metres, hectares, m^3/s, mm/h, m/s, pipe diameters in mm.
    #[default]
    Si,
    /// Feet, acres, ft^3/s, in/h, ft/s, pipe diameters in inches.
    Us,
}

impl UnitSystem {
    /// Metres in one length unit (m or ft).
    pub fn metres_per_length(self) -> f64 {
        match self {
            UnitSystem::Si => 1.0,
            UnitSystem::Us => METRES_PER_FOOT,
        }
    }

    /// Name of the length unit.
    pub fn length_unit(self) -> &'static str {
        match self {
            UnitSystem::Si => "m",
            UnitSystem::Us => "ft",
        }
    }

    /// A length in metres, in this system's length unit.
    pub fn length_from_si(self, metres: f64) -> f64 {
        metres / self.metres_per_length()
    }

    /// A length in this system's unit, in metres.
    pub fn length_to_si(self, length: f64) -> f64 {
        length * self.metres_per_length()
    }

    /// Square metres in one drained-area unit (ha or acre).
    pub fn square_metres_per_area(self) -> f64 {
        match self {
            UnitSystem::Si => SQUARE_METRES_PER_HECTARE,
            UnitSystem::Us => SQUARE_FEET_PER_ACRE * METRES_PER_FOOT * METRES_PER_FOOT,
        }
    }

    /// Name of the drained-area unit.
    pub fn area_unit(self) -> &'static str {
        match self {
            UnitSystem::Si => "ha",
            UnitSystem::Us => "acre",
        }
    }

    /// An area in square metres, in hectares or acres.
    pub fn area_from_si(self, square_metres: f64) -> f64 {
        square_metres / self.square_metres_per_area()
    }

    /// An area in hectares or acres, in square metres.
    pub fn area_to_si(self, area: f64) -> f64 {
        area * self.square_metres_per_area()
    }

    /// Cubic metres per second in one flow unit (m^3/s or ft^3/s).
    pub fn cubic_metres_per_second_per_flow(self) -> f64 {
        let metres = self.metres_per_length();
        metres * metres * metres
    }

    /// Name of the flow unit.
    pub fn flow_unit(self) -> &'static str {
        match self {
            UnitSystem::Si => "m3/s",
            UnitSystem::Us => "ft3/s",
        }
    }

    /// A flow in m^3/s, in this system's flow unit.
    pub fn flow_from_si(self, cubic_metres_per_second: f64) -> f64 {
        cubic_metres_per_second / self.cubic_metres_per_second_per_flow()
    }

    /// A flow in this system's unit, in m^3/s.
    pub fn flow_to_si(self, flow: f64) -> f64 {
        flow * self.cubic_metres_per_second_per_flow()
    }

    /// Millimetres per hour in one intensity unit (mm/h or in/h).
    pub fn millimetres_per_hour_per_intensity(self) -> f64 {
        match self {
            UnitSystem::Si => 1.0,
            UnitSystem::Us => MILLIMETRES_PER_INCH,
        }
    }

    /// Name of the rainfall intensity unit.
    pub fn intensity_unit(self) -> &'static str {
        match self {
            UnitSystem::Si => "mm/h",
            UnitSystem::Us => "in/h",
        }
    }

    /// An intensity in mm/h, in this system's unit.
    pub fn intensity_from_si(self, millimetres_per_hour: f64) -> f64 {
        millimetres_per_hour / self.millimetres_per_hour_per_intensity()
    }

    /// An intensity in this system's unit, in mm/h.
    pub fn intensity_to_si(self, intensity: f64) -> f64 {
        intensity * self.millimetres_per_hour_per_intensity()
    }

    /// Name of the velocity unit.
    pub fn velocity_unit(self) -> &'static str {
        match self {
            UnitSystem::Si => "m/s",
            UnitSystem::Us => "ft/s",
        }
    }

    /// A velocity in m/s, in this system's unit.
    pub fn velocity_from_si(self, metres_per_second: f64) -> f64 {
        metres_per_second / self.metres_per_length()
    }

    /// A velocity in this system's unit, in m/s.
    pub fn velocity_to_si(self, velocity: f64) -> f64 {
        velocity * self.metres_per_length()
    }

    /// Metres in one pipe-diameter unit (mm or inch).
    pub fn metres_per_diameter(self) -> f64 {
        match self {
            UnitSystem::Si => 0.001,
            UnitSystem::Us => MILLIMETRES_PER_INCH / 1000.0,
        }
    }

    /// Name of the pipe-diameter unit.
    pub fn diameter_unit(self) -> &'static str {
        match self {
            UnitSystem::Si => "mm",
            UnitSystem::Us => "in",
        }
    }

    /// A diameter in metres, in mm or inches.
    pub fn diameter_from_si(self, metres: f64) -> f64 {
        metres / self.metres_per_diameter()
    }

    /// A diameter in mm or inches, in metres.
    pub fn diameter_to_si(self, diameter: f64) -> f64 {
        diameter * self.metres_per_diameter()
    }
}

/// Metres in one length unit of a network (`Network::units`): `m` or `ft` for drainage sites
/// (also `mm`, `cm` and `km`, so any metric network can be sized).
pub fn metres_per_network_unit(units: &str) -> Result<f64, DrainageError> {
    match units.trim() {
        "m" => Ok(1.0),
        "ft" => Ok(METRES_PER_FOOT),
        "mm" => Ok(0.001),
        "cm" => Ok(0.01),
        "km" => Ok(1000.0),
        other => Err(DrainageError::LengthUnit {
            unit: other.to_string(),
        }),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    // Checks against the exact definitions (NIST Handbook 44, Appendix C, and the 1959
    // international yard and pound agreement): 1 ft = 0.3048 m, 1 in = 25.4 mm,
    // 1 acre = 43,560 ft^2, 1 ha = 10,000 m^2.

    #[test]
    fn an_acre_is_4046_856_square_metres() {
        // 43,560 * 0.3048^2 = 4046.8564224 m^2 exactly (NIST Handbook 44, Appendix C).
        let acre = UnitSystem::Us.area_to_si(1.0);
        assert!((acre - 4_046.856_422_4).abs() < 1e-9, "{acre}");
        // 1 ha = 2.471 054 acres.
        let hectare_in_acres = UnitSystem::Us.area_from_si(UnitSystem::Si.area_to_si(1.0));
        assert!(
            (hectare_in_acres - 2.471_054).abs() < 1e-6,
            "{hectare_in_acres}"
        );
    }

    #[test]
    fn a_cubic_foot_per_second_is_0_028317_cubic_metres_per_second() {
        // 0.3048^3 = 0.028316846592 m^3 exactly.
        let cfs = UnitSystem::Us.flow_to_si(1.0);
        assert!((cfs - 0.028_316_846_592).abs() < 1e-15, "{cfs}");
        assert!((UnitSystem::Us.flow_from_si(cfs) - 1.0).abs() < 1e-12);
    }

    #[test]
    fn lengths_intensities_velocities_and_diameters_convert_exactly() {
        assert_eq!(UnitSystem::Us.length_to_si(1.0), 0.3048);
        assert_eq!(UnitSystem::Us.intensity_to_si(1.0), 25.4);
        assert!((UnitSystem::Us.velocity_from_si(3.048) - 10.0).abs() < 1e-12);
        // A 12-inch pipe is 304.8 mm.
        assert!((UnitSystem::Us.diameter_to_si(12.0) - 0.3048).abs() < 1e-15);
        assert!((UnitSystem::Si.diameter_to_si(300.0) - 0.3).abs() < 1e-15);
        assert!((UnitSystem::Si.diameter_from_si(0.45) - 450.0).abs() < 1e-9);
        // SI is the identity, except diameters (mm) and areas (ha).
        assert_eq!(UnitSystem::Si.length_from_si(7.5), 7.5);
        assert_eq!(UnitSystem::Si.area_from_si(25_000.0), 2.5);
    }

    #[test]
    fn network_units_are_named_or_refused() {
        assert_eq!(metres_per_network_unit("ft").unwrap(), 0.3048);
        assert_eq!(metres_per_network_unit("m").unwrap(), 1.0);
        let error = metres_per_network_unit("furlong").unwrap_err();
        assert!(error.to_string().contains("furlong"), "{error}");
    }
}
