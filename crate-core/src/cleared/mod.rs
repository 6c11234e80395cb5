//! Cleared-leaf images: from grey pixels (`GreyImage`) to a traced network, step by step
//! (`analyse_cleared_leaf`, giving a `ClearedLeaf` with every intermediate image and number),
//! and on to a calibrated, repaired `Specimen` measured like any other
//! (`build_cleared_specimen`). Errors: `ClearedError`.
//!
//! The steps:
//! 1. **Leaf outline.** Otsu's threshold (Otsu 1979) over the whole image splits leaf from
//!    background (the leaf darker by default); the largest 4-connected part is kept and its
//!    holes filled (`regions`). The mask is usable as a growth mask (`leaf_mask_grid`), and
//!    its outline ring (along pixel edges) has exactly the mask's pixel count as its area.
//! 2. **Veins.** Inside the leaf, veins are the pixels on the vein side (darker by default)
//!    of a second Otsu threshold over the leaf's pixels only, or of the local mean of the
//!    leaf's pixels in a square window minus an offset (`threshold`).
//! 3. **Skeleton.** Zhang & Suen thinning (1984), then staircase corners removed
//!    (`thinning`).
//! 4. **Graph.** End points, branch points and the pixel chains between them; spurs shorter
//!    than a set length pruned; chains simplified (`skeleton_graph`).
//! 5. **Widths.** The exact Euclidean distance transform of the vein mask (Felzenszwalb &
//!    Huttenlocher 2012, `distance`): a skeleton pixel whose centre lies `d` pixels from the
//!    nearest non-vein pixel centre sits in a vein `2 d - 1` pixels wide (exact for odd
//!    widths centred on the pixel).
//!
//! The chains become a `Trace` in pixel units ((0, 0) the top-left corner of the image, y
//! down) with the outline ring, and go through the same calibration, repair and orientation
//! as traced drawings (`specimen::build_specimen_from_trace`). Decoding PNG and JPEG bytes is
//! `decode` (feature `image-decode`, for the command line; the page decodes with the
//! browser and hands RGBA pixels to `GreyImage::from_rgba`).

#[cfg(feature = "image-decode")]
pub mod decode;
pub mod distance;
pub mod regions;
pub mod report;
pub mod skeleton_graph;
pub mod thinning;
pub mod threshold;

use crate::mask::MaskGrid;
use crate::specimen::{
    build_specimen_from_trace, Specimen, SpecimenError, SpecimenFormat, SpecimenOptions, Trace,
    TracedLine,
};

/// Largest image side read, in pixels.
pub const MAX_IMAGE_SIDE: u32 = 30_000;

/// Most pixels an image may have (50 million: a 600 dpi scan of a 30 x 20 cm sheet; the
/// working images take about 20 bytes a pixel, a gigabyte at this size).
pub const MAX_IMAGE_PIXELS: u64 = 50_000_000;

/// An 8-bit grey image, row by row from the top-left corner.
#[derive(Clone, Debug, PartialEq)]
pub struct GreyImage {
    /// Width in pixels.
    pub width: u32,
    /// Height in pixels.
    pub height: u32,
    /// `width x height` grey levels, 0 black to 255 white.
    pub pixels: Vec<u8>,
    /// Millimetres per pixel stated by the file (a PNG `pHYs` chunk in metres, a JPEG
    /// density in dots per inch or centimetre), when it states one.
    pub millimetres_per_pixel: Option<f64>,
}

/// Checks an image size against the limits before anything of that size is allocated.
pub fn check_image_size(width: u32, height: u32) -> Result<(), ClearedError> {
    let pixels = u64::from(width) * u64::from(height);
    if width == 0 || height == 0 {
        return Err(ClearedError::EmptyImage { width, height });
    }
    if width > MAX_IMAGE_SIDE || height > MAX_IMAGE_SIDE || pixels > MAX_IMAGE_PIXELS {
        return Err(ClearedError::TooLarge { width, height });
    }
    Ok(())
}

impl GreyImage {
    /// An image from grey levels; fails when the size is outside the limits or the pixel
    /// count does not match.
    pub fn new(width: u32, height: u32, pixels: Vec<u8>) -> Result<GreyImage, ClearedError> {
        check_image_size(width, height)?;
        let expected = width as usize * height as usize;
        if pixels.len() != expected {
            return Err(ClearedError::PixelCount {
                expected,
                given: pixels.len(),
            });
        }
        Ok(GreyImage {
            width,
            height,
            pixels,
            millimetres_per_pixel: None,
        })
    }

    /// An image from RGBA bytes (as a browser's `ImageData` gives them), made grey by the
    /// luma weights of ITU-R BT.709 (0.2126 R + 0.7152 G + 0.0722 B, rounded), alpha
    /// ignored.
    pub fn from_rgba(width: u32, height: u32, rgba: &[u8]) -> Result<GreyImage, ClearedError> {
        check_image_size(width, height)?;
        let expected = width as usize * height as usize;
        if rgba.len() != expected * 4 {
            return Err(ClearedError::PixelCount {
                expected: expected * 4,
                given: rgba.len(),
            });
        }
        let pixels = rgba
            .chunks_exact(4)
            .map(|p| luma(p[0], p[1], p[2]))
            .collect();
        GreyImage::new(width, height, pixels)
    }
}

/// BT.709 luma of an RGB pixel, in integer arithmetic (weights in 1/10000).
pub fn luma(red: u8, green: u8, blue: u8) -> u8 {
    let sum = 2126 * u32::from(red) + 7152 * u32::from(green) + 722 * u32::from(blue);
    ((sum + 5000) / 10000) as u8
}

/// How veins are told from the leaf's tissue.
#[derive(Clone, Debug, PartialEq)]
pub enum VeinThreshold {
    /// Otsu's threshold over the leaf's pixels only.
    Global,
    /// The mean of the `window x window` square around each pixel minus `offset` grey levels.
    Local {
        /// Window side in pixels (made odd).
        window: u32,
        /// Grey levels below the local mean a vein pixel must be.
        offset: f64,
    },
}

/// Everything a caller states about a cleared-leaf image.
#[derive(Clone, Debug, PartialEq)]
pub struct ClearedOptions {
    /// The leaf is darker than the background (light shining through from behind); false for
    /// a leaf lighter than a dark background.
    pub leaf_darker: bool,
    /// Veins are darker than the tissue around them (stained veins); false for light veins.
    pub veins_darker: bool,
    /// How veins are told from tissue.
    pub vein_threshold: VeinThreshold,
    /// Chains from an end point shorter than this many pixels are pruned as spurs.
    pub spur_length: f64,
    /// Douglas-Peucker tolerance for the chains, in pixels.
    pub simplify_tolerance: f64,
}

/// Default spur length, in pixels (common practice, no source: twice the width of a thin
/// vein at the resolutions cleared leaves are scanned at).
pub const DEFAULT_SPUR_LENGTH: f64 = 10.0;

/// Default Douglas-Peucker tolerance, in pixels (a pixel chain strays up to half a pixel
/// from the line it samples).
pub const DEFAULT_SIMPLIFY_TOLERANCE: f64 = 1.0;

impl Default for ClearedOptions {
    fn default() -> Self {
        ClearedOptions {
            leaf_darker: true,
            veins_darker: true,
            vein_threshold: VeinThreshold::Global,
            spur_length: DEFAULT_SPUR_LENGTH,
            simplify_tolerance: DEFAULT_SIMPLIFY_TOLERANCE,
        }
    }
}

/// One vein found in the image: a simplified chain with its width.
#[derive(Clone, Debug, PartialEq)]
pub struct ImageVein {
    /// The polyline, in pixel units ((0, 0) the image's top-left corner, y down).
    pub points: Vec<(f64, f64)>,
    /// Length of the unsimplified pixel chain, in pixels.
    pub length: f64,
    /// Mean width along the chain, in pixels (`2 d - 1` from the distance transform); 1 for
    /// a chain with no pixel of its own.
    pub width: f64,
}

/// Every step of reading a cleared-leaf image: the numbers for the report and each
/// intermediate image, for showing and tuning.
#[derive(Clone, Debug, PartialEq)]
pub struct ClearedLeaf {
    /// Image width in pixels.
    pub width: u32,
    /// Image height in pixels.
    pub height: u32,
    /// Otsu's threshold between leaf and background (grey level; the class at or below it is
    /// the darker one).
    pub leaf_threshold: u8,
    /// The leaf: the largest part on the leaf's side of the threshold, holes filled.
    pub leaf_mask: Vec<bool>,
    /// Pixels in `leaf_mask`.
    pub leaf_pixels: usize,
    /// Holes filled in the leaf (pixels).
    pub leaf_holes_filled: usize,
    /// The leaf's outline along pixel edges, in pixel units; its shoelace area is
    /// `leaf_pixels`.
    pub outline: Vec<(f64, f64)>,
    /// Otsu's threshold between veins and tissue over the leaf's pixels, when global.
    pub vein_threshold: Option<u8>,
    /// Vein pixels (inside the leaf).
    pub vein_mask: Vec<bool>,
    /// Pixels in `vein_mask`.
    pub vein_pixels: usize,
    /// The skeleton of the veins.
    pub skeleton: Vec<bool>,
    /// Pixels in `skeleton`.
    pub skeleton_pixels: usize,
    /// Zhang-Suen iterations run.
    pub thinning_iterations: usize,
    /// End points before spurs were pruned.
    pub end_points_before_pruning: usize,
    /// Spurs pruned.
    pub spurs_pruned: usize,
    /// Lone skeleton pixels dropped.
    pub lone_pixels: usize,
    /// The veins kept.
    pub veins: Vec<ImageVein>,
    /// Nodes of the skeleton's graph after pruning with exactly one chain (end points).
    pub end_points: usize,
    /// Nodes with three or more chains (branch points).
    pub branch_points: usize,
    /// Mean vein width over the skeleton pixels of the kept chains, in pixels.
    pub mean_vein_width: Option<f64>,
}

impl ClearedLeaf {
    /// The veins and outline as a `Trace` in pixel units, ready for calibration and repair.
    pub fn trace(&self) -> Trace {
        Trace {
            lines: self
                .veins
                .iter()
                .enumerate()
                .map(|(index, vein)| TracedLine {
                    points: vein.points.clone(),
                    source: format!(
                        "skeleton chain {} from pixel ({:.1}, {:.1})",
                        index + 1,
                        vein.points[0].0,
                        vein.points[0].1
                    ),
                    width: Some(vein.width),
                })
                .collect(),
            outline: (self.outline.len() >= 3).then(|| self.outline.clone()),
            format: Some(SpecimenFormat::Image),
            ..Trace::default()
        }
    }

    /// The leaf mask as a growth mask (`MaskGrid`, true inside the leaf).
    pub fn leaf_mask_grid(&self) -> MaskGrid {
        MaskGrid::from_bits(self.width, self.height, &self.leaf_mask)
    }
}

/// Why a cleared-leaf image could not be read.
#[derive(Clone, Debug, PartialEq)]
pub enum ClearedError {
    /// The image has no pixel.
    EmptyImage {
        /// Width in pixels.
        width: u32,
        /// Height in pixels.
        height: u32,
    },
    /// The image is larger than the limits (`MAX_IMAGE_SIDE`, `MAX_IMAGE_PIXELS`).
    TooLarge {
        /// Width in pixels.
        width: u32,
        /// Height in pixels.
        height: u32,
    },
    /// The pixel buffer does not match the size.
    PixelCount {
        /// Bytes or pixels expected.
        expected: usize,
        /// Given.
        given: usize,
    },
    /// The bytes could not be decoded.
    Decode {
        /// `PNG` or `JPEG`.
        format: &'static str,
        /// What is wrong.
        problem: String,
    },
    /// The bytes are neither PNG nor JPEG.
    NotAnImage {
        /// The first bytes, printable.
        start: String,
    },
    /// No leaf was found: the image has a single grey level.
    NoLeaf {
        /// The grey level.
        level: u8,
    },
    /// No vein was found in the leaf.
    NoVeins {
        /// What was found instead.
        detail: String,
    },
    /// An option is not usable.
    Option {
        /// The option.
        option: &'static str,
        /// What is wrong.
        problem: String,
    },
    /// Calibration or repair of the traced veins failed.
    Specimen(SpecimenError),
}

impl std::fmt::Display for ClearedError {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            ClearedError::EmptyImage { width, height } => {
                write!(
                    f,
                    "the image is {width} x {height} pixels: it holds no pixel"
                )
            }
            ClearedError::TooLarge { width, height } => write!(
                f,
                "the image is {width} x {height} pixels, beyond the limit of {MAX_IMAGE_SIDE} \
                 pixels a side and {MAX_IMAGE_PIXELS} pixels in all; scale it down first"
            ),
            ClearedError::PixelCount { expected, given } => write!(
                f,
                "the pixel buffer holds {given} values where the size needs {expected}"
            ),
            ClearedError::Decode { format, problem } => {
                write!(f, "the {format} image cannot be decoded: {problem}")
            }
            ClearedError::NotAnImage { start } => write!(
                f,
                "not a PNG or JPEG image (no PNG or JPEG signature); the file starts with \
                 {start:?}"
            ),
            ClearedError::NoLeaf { level } => write!(
                f,
                "no leaf found: every pixel has grey level {level}, so no threshold splits \
                 leaf from background"
            ),
            ClearedError::NoVeins { detail } => write!(f, "no vein found in the leaf: {detail}"),
            ClearedError::Option { option, problem } => write!(f, "{option}: {problem}"),
            ClearedError::Specimen(error) => error.fmt(f),
        }
    }
}

impl std::error::Error for ClearedError {}

/// Reads a cleared-leaf image step by step (see the module's description).
pub fn analyse_cleared_leaf(
    image: &GreyImage,
    options: &ClearedOptions,
) -> Result<ClearedLeaf, ClearedError> {
    check_image_size(image.width, image.height)?;
    let (width, height) = (image.width as usize, image.height as usize);
    if image.pixels.len() != width * height {
        return Err(ClearedError::PixelCount {
            expected: width * height,
            given: image.pixels.len(),
        });
    }
    check_options(options)?;
    // 1. Leaf outline.
    let counts = threshold::histogram(&image.pixels, None);
    let leaf_threshold = threshold::otsu_threshold(&counts).unwrap_or(0);
    let leaf_side: Vec<bool> = image
        .pixels
        .iter()
        .map(|&value| (value <= leaf_threshold) == options.leaf_darker)
        .collect();
    let uniform = counts.iter().filter(|&&count| count > 0).count() == 1;
    if uniform {
        return Err(ClearedError::NoLeaf {
            level: leaf_threshold,
        });
    }
    let (mut leaf_mask, part_pixels) = regions::largest_component(&leaf_side, width, height);
    drop(leaf_side);
    regions::fill_holes(&mut leaf_mask, width, height);
    let leaf_pixels = leaf_mask.iter().filter(|&&on| on).count();
    let outline = regions::outline_ring(&leaf_mask, width, height);
    // 2. Veins.
    let (vein_threshold, mut vein_mask) = match options.vein_threshold {
        VeinThreshold::Global => {
            let leaf_counts = threshold::histogram(&image.pixels, Some(&leaf_mask));
            let level = threshold::otsu_threshold(&leaf_counts).unwrap_or(0);
            let mask: Vec<bool> = image
                .pixels
                .iter()
                .map(|&value| (value <= level) == options.veins_darker)
                .collect();
            (Some(level), mask)
        }
        VeinThreshold::Local { window, offset } => {
            let window = (window as usize) | 1;
            let mask = if options.veins_darker {
                threshold::local_mean_below(
                    &image.pixels,
                    &leaf_mask,
                    width,
                    height,
                    window,
                    offset,
                )
            } else {
                let inverted: Vec<u8> = image.pixels.iter().map(|&v| 255 - v).collect();
                threshold::local_mean_below(&inverted, &leaf_mask, width, height, window, offset)
            };
            (None, mask)
        }
    };
    for (vein, &leaf) in vein_mask.iter_mut().zip(&leaf_mask) {
        *vein &= leaf;
    }
    let vein_pixels = vein_mask.iter().filter(|&&on| on).count();
    if vein_pixels == 0 {
        return Err(ClearedError::NoVeins {
            detail: format!(
                "no pixel of the leaf ({leaf_pixels} pixels) lies on the vein side of the \
                 threshold"
            ),
        });
    }
    // 3. Skeleton.
    let mut skeleton = vein_mask.clone();
    let thinning_iterations = thinning::zhang_suen_thin(&mut skeleton, width, height);
    thinning::remove_staircase_corners(&mut skeleton, width, height);
    let skeleton_pixels = skeleton.iter().filter(|&&on| on).count();
    // 4. Graph.
    let graph = skeleton_graph::skeleton_graph(
        &skeleton,
        width,
        height,
        options.spur_length,
        options.simplify_tolerance,
    );
    // 5. Widths.
    let squared = distance::squared_distance_to_background(&vein_mask, width, height);
    let mut width_sum = 0.0;
    let mut width_count = 0usize;
    let veins: Vec<ImageVein> = graph
        .chains
        .iter()
        .map(|chain| {
            let widths: Vec<f64> = chain
                .pixels
                .iter()
                .map(|&p| (2.0 * squared[p].sqrt() - 1.0).max(1.0))
                .collect();
            width_sum += widths.iter().sum::<f64>();
            width_count += widths.len();
            ImageVein {
                points: chain.points.clone(),
                length: chain.length,
                width: if widths.is_empty() {
                    1.0
                } else {
                    widths.iter().sum::<f64>() / widths.len() as f64
                },
            }
        })
        .collect();
    let mut degree = vec![0usize; graph.nodes.len()];
    for chain in &graph.chains {
        degree[chain.ends.0] += 1;
        degree[chain.ends.1] += 1;
    }
    let _ = part_pixels;
    Ok(ClearedLeaf {
        width: image.width,
        height: image.height,
        leaf_threshold,
        leaf_holes_filled: leaf_pixels - part_pixels,
        leaf_mask,
        leaf_pixels,
        outline,
        vein_threshold,
        vein_mask,
        vein_pixels,
        skeleton,
        skeleton_pixels,
        thinning_iterations,
        end_points_before_pruning: graph.end_points_before_pruning,
        spurs_pruned: graph.spurs_pruned,
        lone_pixels: graph.lone_pixels,
        veins,
        end_points: degree.iter().filter(|&&d| d == 1).count(),
        branch_points: degree.iter().filter(|&&d| d >= 3).count(),
        mean_vein_width: (width_count > 0).then(|| width_sum / width_count as f64),
    })
}

fn check_options(options: &ClearedOptions) -> Result<(), ClearedError> {
    let finite_non_negative = |option: &'static str, value: f64| {
        if value >= 0.0 && value.is_finite() {
            Ok(())
        } else {
            Err(ClearedError::Option {
                option,
                problem: format!("must be zero or a positive finite number, is {value}"),
            })
        }
    };
    finite_non_negative("spur length", options.spur_length)?;
    finite_non_negative("simplification tolerance", options.simplify_tolerance)?;
    if let VeinThreshold::Local { window, offset } = options.vein_threshold {
        if !(3..=1001).contains(&window) {
            return Err(ClearedError::Option {
                option: "local threshold window",
                problem: format!("must be 3 to 1001 pixels, is {window}"),
            });
        }
        if !offset.is_finite() {
            return Err(ClearedError::Option {
                option: "local threshold offset",
                problem: format!("must be a finite number of grey levels, is {offset}"),
            });
        }
    }
    Ok(())
}

/// A cleared-leaf image read, calibrated and repaired.
#[derive(Clone, Debug, PartialEq)]
pub struct ClearedSpecimen {
    /// The specimen, as any traced one: its network in output units, repairs, calibration.
    pub specimen: Specimen,
    /// Every step of reading the image.
    pub leaf: ClearedLeaf,
}

/// Reads a cleared-leaf image into a specimen: `analyse_cleared_leaf`, then the traced
/// veins through `build_specimen_from_trace` with `options` (scale from the image's stated
/// density when `ScaleRule::FromFile`; coordinates and `--root` in pixels).
pub fn build_cleared_specimen(
    image: &GreyImage,
    cleared: &ClearedOptions,
    options: &SpecimenOptions,
) -> Result<ClearedSpecimen, ClearedError> {
    let leaf = analyse_cleared_leaf(image, cleared)?;
    if leaf.veins.is_empty() {
        return Err(ClearedError::NoVeins {
            detail: format!(
                "the skeleton ({} pixels) held no chain longer than the spur length ({} pixels)",
                leaf.skeleton_pixels, cleared.spur_length
            ),
        });
    }
    let mut trace = leaf.trace();
    trace.physical_scale = image
        .millimetres_per_pixel
        .map(|millimetres| (millimetres, "the image's stated resolution"));
    let specimen = build_specimen_from_trace(trace, options).map_err(ClearedError::Specimen)?;
    Ok(ClearedSpecimen { specimen, leaf })
}
