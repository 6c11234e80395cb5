//! The Rational Method `Q = C i A / K` (peak flow from runoff coefficient, rainfall intensity
//! and drained area), the area-weighted composite runoff coefficient, and `RunoffTable`, the
//! user-editable table of runoff coefficients by surface whose `Default` holds the ranges of the
//! US FHWA HEC-22 Rational Method table.

use serde::{Deserialize, Serialize};

use super::units::UnitSystem;
use super::DrainageError;

/// K of the Rational Method for Q in m^3/s, i in mm/h and A in ha: 1 mm/h on 1 ha is
/// 10 m^3/h = 1/360 m^3/s (US FHWA HEC-22, 3rd ed. 2009, eq. 3-1, SI form; equation number
/// from memory).
pub const RATIONAL_K_SI: f64 = 360.0;
/// K of the Rational Method for Q in ft^3/s, i in in/h and A in acres (HEC-22 eq. 3-1, US
/// form; from memory): 1 in/h on 1 acre is 1.008 ft^3/s, which the method rounds to 1.
pub const RATIONAL_K_US: f64 = 1.0;

/// Peak flow by the Rational Method in the units of `system`: `c` dimensionless,
/// `intensity` in mm/h or in/h, `area` in ha or acres, the result in m^3/s or ft^3/s, with the
/// handbook's K (360 or 1; the US form is 0.8 % below the exact conversion, as HEC-22 accepts).
pub fn peak_flow(c: f64, intensity: f64, area: f64, system: UnitSystem) -> f64 {
    let k = match system {
        UnitSystem::Si => RATIONAL_K_SI,
        UnitSystem::Us => RATIONAL_K_US,
    };
    c * intensity * area / k
}

/// Peak flow in m^3/s from `c`, an intensity in mm/h and an area in m^2 (exact conversion:
/// 1 mm/h on 1 m^2 is 1 / 3,600,000 m^3/s). The network pass computes with this.
pub fn peak_flow_si(c: f64, intensity_mm_per_hour: f64, area_square_metres: f64) -> f64 {
    c * intensity_mm_per_hour * area_square_metres / 3_600_000.0
}

/// The area-weighted runoff coefficient of several surfaces, `sum(C_k A_k) / sum(A_k)`
/// (HEC-22's composite coefficient, eq. 3-2 from memory); `None` when the areas sum to zero.
pub fn composite_runoff(parts: &[(f64, f64)]) -> Option<f64> {
    let area: f64 = parts.iter().map(|&(area, _)| area).sum();
    let weighted: f64 = parts.iter().map(|&(area, c)| area * c).sum();
    (area > 0.0).then(|| weighted / area)
}

/// One surface of the runoff table: its name, the handbook's range and the value used.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct SurfaceRunoff {
    /// Short key (`roof`, `asphalt`, `lawn_sandy_flat`, ...).
    pub surface: String,
    /// What the surface is, in words.
    pub label: String,
    /// Lower end of the cited range.
    pub low: f64,
    /// Upper end of the cited range.
    pub high: f64,
    /// The coefficient used (by default the upper end of the range, which errs on the side of
    /// larger channels).
    pub c: f64,
    /// Where the range comes from.
    pub source: String,
}

/// Runoff coefficients by surface. Data a caller passes (a user may edit every row); its
/// `Default` holds the cited defaults.
#[derive(Clone, Debug, PartialEq, Serialize, Deserialize)]
pub struct RunoffTable {
    /// The surfaces, in the order they are listed.
    pub surfaces: Vec<SurfaceRunoff>,
}

/// Citation of the default table's rows taken from HEC-22.
const HEC22_TABLE: &str = "US FHWA HEC-22 Urban Drainage Design Manual, 3rd ed. (2009), \
Table 3-1 (table number from memory; ranges as in the ASCE table it reproduces)";

/// `(surface, label, low, high, source)` of the default table.
const DEFAULT_ROWS: [(&str, &str, f64, f64, &str); 16] = [
    ("roof", "Roofs", 0.75, 0.95, HEC22_TABLE),
    ("asphalt", "Asphalt paving", 0.70, 0.95, HEC22_TABLE),
    ("concrete", "Concrete paving", 0.80, 0.95, HEC22_TABLE),
    ("brick", "Brick paving", 0.70, 0.85, HEC22_TABLE),
    ("drives_walks", "Drives and walks", 0.75, 0.85, HEC22_TABLE),
    (
        "lawn_sandy_flat",
        "Lawn, sandy soil, flat (2 %)",
        0.05,
        0.10,
        HEC22_TABLE,
    ),
    (
        "lawn_sandy_average",
        "Lawn, sandy soil, average (2-7 %)",
        0.10,
        0.15,
        HEC22_TABLE,
    ),
    (
        "lawn_sandy_steep",
        "Lawn, sandy soil, steep (7 %)",
        0.15,
        0.20,
        HEC22_TABLE,
    ),
    (
        "lawn_heavy_flat",
        "Lawn, heavy soil, flat (2 %)",
        0.13,
        0.17,
        HEC22_TABLE,
    ),
    (
        "lawn_heavy_average",
        "Lawn, heavy soil, average (2-7 %)",
        0.18,
        0.22,
        HEC22_TABLE,
    ),
    (
        "lawn_heavy_steep",
        "Lawn, heavy soil, steep (7 %)",
        0.25,
        0.35,
        HEC22_TABLE,
    ),
    ("park", "Parks, cemeteries", 0.10, 0.25, HEC22_TABLE),
    ("playground", "Playgrounds", 0.20, 0.35, HEC22_TABLE),
    ("unimproved", "Unimproved areas", 0.10, 0.30, HEC22_TABLE),
    (
        "gravel",
        "Gravel surface",
        0.35,
        0.70,
        "not in HEC-22's table; from memory",
    ),
    (
        "planting_bed",
        "Planting beds (mulched)",
        0.10,
        0.30,
        "not in HEC-22's table; the unimproved-areas range, common practice, no source",
    ),
];

impl Default for RunoffTable {
    fn default() -> Self {
        RunoffTable {
            surfaces: DEFAULT_ROWS
                .iter()
                .map(|&(surface, label, low, high, source)| SurfaceRunoff {
                    surface: surface.to_string(),
                    label: label.to_string(),
                    low,
                    high,
                    c: high,
                    source: source.to_string(),
                })
                .collect(),
        }
    }
}

impl RunoffTable {
    /// The coefficient used for `surface`, or `None` when the table has no such surface.
    pub fn coefficient(&self, surface: &str) -> Option<f64> {
        self.surfaces
            .iter()
            .find(|row| row.surface == surface)
            .map(|row| row.c)
    }

    /// The coefficient used for `surface`, or an error naming it and the surfaces listed.
    pub fn coefficient_of(&self, surface: &str) -> Result<f64, DrainageError> {
        self.coefficient(surface)
            .ok_or_else(|| DrainageError::UnknownSurface {
                surface: surface.to_string(),
                known: self
                    .surfaces
                    .iter()
                    .map(|row| row.surface.clone())
                    .collect(),
            })
    }

    /// Checks every row: coefficients (and range ends) between 0 and 1, the range in order.
    pub fn validate(&self) -> Result<(), DrainageError> {
        for row in &self.surfaces {
            for (field, value) in [("c", row.c), ("low", row.low), ("high", row.high)] {
                if !(0.0..=1.0).contains(&value) {
                    return Err(DrainageError::RunoffTable {
                        surface: row.surface.clone(),
                        field,
                        value,
                    });
                }
            }
            if row.low > row.high {
                return Err(DrainageError::RunoffTable {
                    surface: row.surface.clone(),
                    field: "low",
                    value: row.low,
                });
            }
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn si_form_matches_a_published_worked_example() {
        // San Diego State University course CIVE 445, midterm 2, problem 1, worked solution
        // (facets.sdsu.edu/protected29/cive445_midterm_2_problem_1.html): effective intensity 45.48 mm/h on 80 ha (runoff fully
        // effective, C = 1) gives Qp = 10.11 m^3/s.
        let q = peak_flow(1.0, 45.48, 80.0, UnitSystem::Si);
        assert!((q - 10.11).abs() < 0.005, "{q}");
        // The exact SI form agrees with K = 360 (1 ha = 10,000 m^2).
        let exact = peak_flow_si(1.0, 45.48, 80.0 * 10_000.0);
        assert!((exact - q).abs() < 1e-12, "{exact} {q}");
    }

    #[test]
    fn us_form_and_composite_coefficient_match_a_published_worked_example() {
        // Textbook problem reproduced at sciemce.com/qa/Y4VPWzsTxn46 (rural area of 256 acres:
        // steep grass 15 % at C = 0.60, forest 30 % at 0.20, cultivated 55 % at 0.30; i =
        // 1.45 in/h): Cw = 0.315 and Q = 116.9 ft^3/s with Q = C i A (K = 1).
        let parts = [
            (0.15 * 256.0, 0.60),
            (0.30 * 256.0, 0.20),
            (0.55 * 256.0, 0.30),
        ];
        let c = composite_runoff(&parts).unwrap();
        assert!((c - 0.315).abs() < 1e-12, "{c}");
        let q = peak_flow(c, 1.45, 256.0, UnitSystem::Us);
        assert!((q - 116.9).abs() < 0.05, "{q}");
    }

    #[test]
    fn one_inch_per_hour_on_an_acre_is_1_008_cubic_feet_per_second() {
        // The factor HEC-22 rounds to 1 (HEC-22 eq. 3-1 note; from memory): 43,560 ft^2 *
        // (1/12 ft) / 3600 s = 1.00833 ft^3/s.
        let acre = UnitSystem::Us.area_to_si(1.0);
        let q = UnitSystem::Us.flow_from_si(peak_flow_si(1.0, 25.4, acre));
        assert!((q - 1.008_333).abs() < 1e-5, "{q}");
    }

    #[test]
    fn composite_of_roof_paving_and_lawn() {
        // Hand arithmetic: 0.2 ha roof at 0.95, 0.3 ha asphalt at 0.95, 0.5 ha sandy flat lawn
        // at 0.10: (0.19 + 0.285 + 0.05) / 1.0 = 0.525.
        let table = RunoffTable::default();
        let parts = [
            (0.2, table.coefficient("roof").unwrap()),
            (0.3, table.coefficient("asphalt").unwrap()),
            (0.5, table.coefficient("lawn_sandy_flat").unwrap()),
        ];
        let c = composite_runoff(&parts).unwrap();
        assert!((c - 0.525).abs() < 1e-12, "{c}");
        assert_eq!(composite_runoff(&[]), None);
    }

    #[test]
    fn default_table_holds_hec22_ranges_and_refuses_bad_edits() {
        // Ranges of the ASCE table reproduced in US FHWA HEC-22, 3rd ed. (2009), Table 3-1
        // (table number from memory): lawns on sandy flat soil 0.05-0.10, heavy
        // steep 0.25-0.35, asphalt streets 0.70-0.95, concrete 0.80-0.95, roofs 0.75-0.95.
        let table = RunoffTable::default();
        let range = |key: &str| {
            let row = table
                .surfaces
                .iter()
                .find(|row| row.surface == key)
                .unwrap();
            (row.low, row.high)
        };
        assert_eq!(range("lawn_sandy_flat"), (0.05, 0.10));
        assert_eq!(range("lawn_heavy_steep"), (0.25, 0.35));
        assert_eq!(range("asphalt"), (0.70, 0.95));
        assert_eq!(range("concrete"), (0.80, 0.95));
        assert_eq!(range("roof"), (0.75, 0.95));
        assert!(table.validate().is_ok());
        let unknown = table.coefficient_of("moss").unwrap_err().to_string();
        assert!(
            unknown.contains("\"moss\"") && unknown.contains("roof"),
            "{unknown}"
        );
        let mut edited = table.clone();
        edited.surfaces[0].c = 1.2;
        let message = edited.validate().unwrap_err().to_string();
        assert!(
            message.contains("roof") && message.contains("1.2"),
            "{message}"
        );
    }
}
