//! `read_geotiff`: an elevation raster from GeoTIFF bytes (OGC GeoTIFF 1.1), placed by its
//! ModelPixelScale (tag 33550) and ModelTiepoint (tag 33922) tags; `ElevationRaster::at` reads
//! the ground between pixel centres bilinearly, and `sample_levels` turns it into spot levels.
//!
//! Placement (OGC 19-008r4, GeoTIFF 1.1, section 7.4 "Raster to model coordinate
//! transformation"): raster point `(I, J)` lies at `X = TX + (I - TI) * SX`,
//! `Y = TY - (J - TJ) * SY`, where the tiepoint ties raster `(TI, TJ)` to model `(TX, TY)` and
//! `(SX, SY)` is the pixel scale. With `GTRasterTypeGeoKey` (1025) = `RasterPixelIsArea` (1,
//! the default) pixel `(i, j)` covers raster `[i, i + 1) x [j, j + 1)` and its value belongs to
//! its centre `(i + 0.5, j + 0.5)`; with `RasterPixelIsPoint` (2) it belongs to `(i, j)`.
//! Rotated or sheared rasters (ModelTransformation, tag 34264, without the two tags) are
//! refused. Elevations are taken in the site's unit; GDAL's no-data value (tag 42113) marks
//! pixels without ground.

use std::io::Cursor;

use tiff::decoder::{Decoder, DecodingResult};
use tiff::tags::Tag;

use super::geometry::{bounds, inside_or_on};
use super::{SiteError, SpotLevel};

/// An elevation raster placed in the site's coordinates (x east, y north).
#[derive(Clone, Debug, PartialEq)]
pub struct ElevationRaster {
    /// Columns.
    pub width: usize,
    /// Rows, the first at the north.
    pub height: usize,
    /// Elevations row by row from the north-west; NaN where the raster has no data.
    pub values: Vec<f64>,
    /// Model x and y of the centre of pixel (0, 0).
    pub first_centre: [f64; 2],
    /// Pixel size in x (east) and y (south), in model units.
    pub pixel: [f64; 2],
}

/// Largest raster read, in pixels: 64 million (512 MB of elevations as 64-bit numbers).
pub const MAX_RASTER_PIXELS: usize = 1 << 26;

/// Reads a single-band GeoTIFF of elevations. Errors say what is missing or not readable.
pub fn read_geotiff(bytes: &[u8]) -> Result<ElevationRaster, SiteError> {
    let fail = |problem: String| SiteError::Raster { problem };
    let mut decoder = Decoder::new(Cursor::new(bytes))
        .map_err(|error| fail(format!("not a readable TIFF: {error}")))?;
    let (width, height) = decoder
        .dimensions()
        .map_err(|error| fail(format!("no image size: {error}")))?;
    let (width, height) = (width as usize, height as usize);
    if width == 0 || height == 0 || width.saturating_mul(height) > MAX_RASTER_PIXELS {
        return Err(fail(format!(
            "{width} x {height} pixels; an elevation raster holds 1 to {MAX_RASTER_PIXELS} pixels"
        )));
    }
    let tag_numbers =
        |decoder: &mut Decoder<Cursor<&[u8]>>, tag: Tag| -> Result<Option<Vec<f64>>, SiteError> {
            match decoder.find_tag(tag) {
                Ok(None) => Ok(None),
                Ok(Some(value)) => value.into_f64_vec().map(Some).map_err(|error| {
                    fail(format!(
                        "tag {} is not a list of numbers: {error}",
                        tag.to_u16()
                    ))
                }),
                Err(error) => Err(fail(format!("tag {} unreadable: {error}", tag.to_u16()))),
            }
        };
    let scale = tag_numbers(&mut decoder, Tag::ModelPixelScaleTag)?;
    let tiepoint = tag_numbers(&mut decoder, Tag::ModelTiepointTag)?;
    let (Some(scale), Some(tiepoint)) = (scale, tiepoint) else {
        let transformed = tag_numbers(&mut decoder, Tag::ModelTransformationTag)?.is_some();
        return Err(fail(if transformed {
            "placed by a ModelTransformation (tag 34264) only; a rotated or sheared raster is not read: give ModelPixelScale (33550) and ModelTiepoint (33922)".to_string()
        } else {
            "not georeferenced: a GeoTIFF needs ModelPixelScale (tag 33550) and ModelTiepoint (tag 33922) to place its pixels on the site".to_string()
        }));
    };
    let (&[scale_x, scale_y, ..], &[tie_i, tie_j, _, tie_x, tie_y, ..]) =
        (scale.as_slice(), tiepoint.as_slice())
    else {
        return Err(fail(format!(
            "ModelPixelScale holds {} values (3 needed) and ModelTiepoint {} (6 needed)",
            scale.len(),
            tiepoint.len()
        )));
    };
    let placement = [scale_x, scale_y, tie_i, tie_j, tie_x, tie_y];
    if !placement.iter().all(|value| value.is_finite()) || scale_x <= 0.0 || scale_y <= 0.0 {
        return Err(fail(format!(
            "pixel scale ({scale_x}, {scale_y}) and tiepoint must be finite, the scale positive"
        )));
    }
    let pixel_is_point = match decoder.find_tag(Tag::GeoKeyDirectoryTag) {
        Ok(Some(value)) => {
            let keys = value.into_u16_vec().unwrap_or_default();
            // Header of four shorts, then entries (key, location, count, value); key 1025 is
            // GTRasterTypeGeoKey, value 2 RasterPixelIsPoint.
            keys.get(4..)
                .unwrap_or(&[])
                .chunks_exact(4)
                .any(|entry| entry[0] == 1025 && entry[1] == 0 && entry[3] == 2)
        }
        _ => false,
    };
    let no_data = match decoder.find_tag(Tag::GdalNodata) {
        Ok(Some(value)) => value
            .into_string()
            .ok()
            .and_then(|text| text.trim_matches(char::from(0)).trim().parse::<f64>().ok()),
        _ => None,
    };
    let image = decoder.read_image().map_err(|error| {
        fail(format!(
            "pixels unreadable (one band of numbers needed): {error}"
        ))
    })?;
    let mut values: Vec<f64> = match image {
        DecodingResult::U8(data) => data.into_iter().map(f64::from).collect(),
        DecodingResult::U16(data) => data.into_iter().map(f64::from).collect(),
        DecodingResult::U32(data) => data.into_iter().map(f64::from).collect(),
        DecodingResult::I8(data) => data.into_iter().map(f64::from).collect(),
        DecodingResult::I16(data) => data.into_iter().map(f64::from).collect(),
        DecodingResult::I32(data) => data.into_iter().map(f64::from).collect(),
        DecodingResult::F32(data) => data.into_iter().map(f64::from).collect(),
        DecodingResult::F64(data) => data,
        _ => {
            return Err(fail(
                "sample type not read (8 to 32-bit integers, 32 or 64-bit floats are)".to_string(),
            ))
        }
    };
    if values.len() != width * height {
        return Err(fail(format!(
            "{} samples for {width} x {height} pixels: one band of elevations is needed",
            values.len()
        )));
    }
    for value in &mut values {
        if !value.is_finite() || no_data == Some(*value) {
            *value = f64::NAN;
        }
    }
    let centre = if pixel_is_point { 0.0 } else { 0.5 };
    let first_centre = [
        tie_x + (centre - tie_i) * scale_x,
        tie_y - (centre - tie_j) * scale_y,
    ];
    // Finite tags can still place the pixels beyond the range of numbers (a scale of 1e308).
    let last_centre = [
        first_centre[0] + (width - 1) as f64 * scale_x,
        first_centre[1] - (height - 1) as f64 * scale_y,
    ];
    if !first_centre
        .iter()
        .chain(&last_centre)
        .all(|value| value.is_finite())
    {
        return Err(fail(format!(
            "pixel scale ({scale_x}, {scale_y}) and tiepoint ({tie_i}, {tie_j}) to ({tie_x}, {tie_y}) place the pixels beyond the range of numbers"
        )));
    }
    Ok(ElevationRaster {
        width,
        height,
        values,
        first_centre,
        pixel: [scale_x, scale_y],
    })
}

impl ElevationRaster {
    /// The ground at `(x, y)`: bilinear between the four nearest pixel centres (the nearest
    /// edge pixels within half a pixel of the raster's edge); `None` outside the raster or
    /// next to a pixel without data.
    pub fn at(&self, x: f64, y: f64) -> Option<f64> {
        let u = (x - self.first_centre[0]) / self.pixel[0];
        let v = (self.first_centre[1] - y) / self.pixel[1];
        let (w, h) = (self.width as f64, self.height as f64);
        if !(u >= -0.5 && u <= w - 0.5 && v >= -0.5 && v <= h - 0.5) {
            return None;
        }
        let (u, v) = (u.clamp(0.0, w - 1.0), v.clamp(0.0, h - 1.0));
        let column = (u.floor() as usize).min(self.width.saturating_sub(2));
        let row = (v.floor() as usize).min(self.height.saturating_sub(2));
        let (fu, fv) = (u - column as f64, v - row as f64);
        let next_column = (column + 1).min(self.width - 1);
        let next_row = (row + 1).min(self.height - 1);
        let value = |c: usize, r: usize| self.values[r * self.width + c];
        let top = value(column, row) * (1.0 - fu) + value(next_column, row) * fu;
        let bottom = value(column, next_row) * (1.0 - fu) + value(next_column, next_row) * fu;
        let z = top * (1.0 - fv) + bottom * fv;
        z.is_finite().then_some(z)
    }

    /// Spot levels sampled from the raster on a regular grid of `per_side` x `per_side` points
    /// over the outline's bounding box (cell-centred, so no point lies on the box's edge),
    /// keeping those inside the outline where the raster has ground. The surface through them
    /// (inverse distance weighting) only approximates the raster: it passes through each sample
    /// and flattens between them.
    pub fn sample_levels(&self, outline: &[[f64; 2]], per_side: u32) -> Vec<SpotLevel> {
        let (low, high) = bounds(outline);
        let per_side = per_side.max(1);
        let mut levels = Vec::new();
        for row in 0..per_side {
            for column in 0..per_side {
                let x = low[0] + (high[0] - low[0]) * (column as f64 + 0.5) / per_side as f64;
                let y = high[1] - (high[1] - low[1]) * (row as f64 + 0.5) / per_side as f64;
                if !inside_or_on(outline, [x, y]) {
                    continue;
                }
                if let Some(z) = self.at(x, y) {
                    levels.push(SpotLevel {
                        place: format!("raster sample ({column}, {row})"),
                        x,
                        y,
                        z,
                    });
                }
            }
        }
        levels
    }
}

#[cfg(test)]
mod tests {
    use super::*;
    use tiff::encoder::{colortype, TiffEncoder};

    /// A GeoTIFF of `z = a + b x + c y` sampled at its pixel centres, with the two placement
    /// tags written by the `tiff` crate's encoder.
    fn plane_geotiff(with_tags: bool) -> Vec<u8> {
        placed_geotiff(with_tags, [2.5, 2.0], [0.0, 0.0])
    }

    /// The plane's raster with pixel scale `scale` and raster point `tie` tied to the model
    /// point (1000, 2060).
    fn placed_geotiff(with_tags: bool, scale: [f64; 2], tie: [f64; 2]) -> Vec<u8> {
        let (width, height) = (20u32, 12u32);
        // Pixel (0, 0)'s corner at (1000, 2060), pixels 2.5 m east by 2 m south.
        let (x0, y0, sx, sy) = (1000.0, 2060.0, 2.5, 2.0);
        let mut data = Vec::new();
        for j in 0..height {
            for i in 0..width {
                let x = x0 + (i as f64 + 0.5) * sx;
                let y = y0 - (j as f64 + 0.5) * sy;
                data.push(plane(x, y) as f32);
            }
        }
        let mut bytes = Cursor::new(Vec::new());
        {
            let mut encoder = TiffEncoder::new(&mut bytes).expect("encoder");
            let mut image = encoder
                .new_image::<colortype::Gray32Float>(width, height)
                .expect("image");
            if with_tags {
                image
                    .encoder()
                    .write_tag(Tag::ModelPixelScaleTag, &[scale[0], scale[1], 0.0][..])
                    .expect("scale tag");
                image
                    .encoder()
                    .write_tag(
                        Tag::ModelTiepointTag,
                        &[tie[0], tie[1], 0.0, x0, y0, 0.0][..],
                    )
                    .expect("tiepoint tag");
            }
            image.write_data(&data).expect("pixels");
        }
        bytes.into_inner()
    }

    fn plane(x: f64, y: f64) -> f64 {
        100.0 + 0.01 * (x - 1000.0) - 0.02 * (y - 2000.0)
    }

    /// OGC GeoTIFF 1.1, section 7.4: a raster of a known plane, placed by its pixel scale and
    /// tiepoint, reads back the plane between pixel centres (bilinear interpolation is exact on
    /// a plane; the f32 samples hold it to about 1e-5 m).
    #[test]
    fn a_plane_reads_back_at_sample_points() {
        let raster = read_geotiff(&plane_geotiff(true)).expect("raster");
        assert_eq!((raster.width, raster.height), (20, 12));
        for (x, y) in [
            (1001.25, 2059.0),
            (1020.0, 2040.0),
            (1033.3, 2047.7),
            (1048.0, 2037.0),
        ] {
            let z = raster.at(x, y).expect("inside");
            assert!(
                (z - plane(x, y)).abs() < 1e-4,
                "at ({x}, {y}): {z} vs {}",
                plane(x, y)
            );
        }
        assert_eq!(raster.at(999.0, 2040.0), None);
        assert_eq!(raster.at(1020.0, 2061.0), None);
    }

    #[test]
    fn a_tiff_without_placement_is_refused() {
        let error = read_geotiff(&plane_geotiff(false)).unwrap_err();
        let text = error.to_string();
        assert!(text.contains("33550") && text.contains("33922"), "{text}");
    }

    /// Fuzz regression (tests/tests/fuzz_geotiff.rs): finite tags whose product overflows
    /// (a pixel 1e308 wide, tied at raster point 1e10) placed pixel (0, 0) at minus infinity;
    /// such a raster is refused, naming the scale and tiepoint.
    #[test]
    fn a_placement_beyond_the_range_of_numbers_is_refused() {
        for (scale, tie) in [([1e308, 2.0], [1e10, 0.0]), ([2.0, 1e308], [0.0, -1e10])] {
            let error = read_geotiff(&placed_geotiff(true, scale, tie)).unwrap_err();
            let text = error.to_string();
            assert!(text.contains("beyond the range of numbers"), "{text}");
        }
        // 1e307 wide pixels from x = 1000: the 20th centre, 1000 + 19.5e307, overflows.
        let error = read_geotiff(&placed_geotiff(true, [1e307, 2.0], [0.0, 0.0])).unwrap_err();
        assert!(error.to_string().contains("beyond the range"), "{error}");
    }

    #[test]
    fn samples_fall_inside_the_outline() {
        let raster = read_geotiff(&plane_geotiff(true)).expect("raster");
        let outline = [
            [1005.0, 2038.0],
            [1045.0, 2038.0],
            [1045.0, 2058.0],
            [1005.0, 2058.0],
        ];
        let levels = raster.sample_levels(&outline, 4);
        assert_eq!(levels.len(), 16);
        for level in &levels {
            assert!((level.z - plane(level.x, level.y)).abs() < 1e-4);
        }
    }
}
