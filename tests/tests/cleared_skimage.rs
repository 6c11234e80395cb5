//! The cleared-leaf steps against scikit-image (van der Walt et al. 2014, PeerJ 2:e453), run
//! through `tests/reference/skimage_cleared.py` (which installs scikit-image into
//! target/skimage-venv with pip on its first run): Otsu's threshold on generated grey images
//! must equal `skimage.filters.threshold_otsu` exactly, and the Zhang-Suen skeleton of
//! generated shapes must match `skimage.morphology.skeletonize`'s in topology (end points,
//! branch points, loops), not pixel for pixel, since the two thinning rules differ in some
//! neighbourhoods (exactly on drawn shapes; on the demo image's ragged vein mask within a
//! stated tolerance). If Python or scikit-image cannot be had, the test fails saying so.

use std::path::PathBuf;
use std::process::Command;

use ramulus_core::cleared::decode::decode_image;
use ramulus_core::cleared::thinning::{remove_staircase_corners, zhang_suen_thin};
use ramulus_core::cleared::threshold::{histogram, otsu_threshold};
use ramulus_core::cleared::{analyse_cleared_leaf, ClearedOptions};
use ramulus_tests::cleared_drawing::{disk_image, encode_pgm, skeleton_shapes, Canvas};
use rand_chacha::rand_core::{RngCore, SeedableRng};
use rand_chacha::ChaCha8Rng;

fn folder() -> PathBuf {
    PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../target/skimage-check")
}

/// A value near `mean` with spread `spread` (the sum of four uniform draws, roughly normal).
fn near(rng: &mut ChaCha8Rng, mean: f64, spread: f64) -> u8 {
    let sum: f64 = (0..4)
        .map(|_| (rng.next_u32() as f64 / u32::MAX as f64) - 0.5)
        .sum();
    (mean + sum * spread).round().clamp(0.0, 255.0) as u8
}

/// Generated grey images: mixtures of two or three modes in several proportions, a ramp, a
/// narrow range, two exact levels (every threshold between them ties), a blurred disk.
fn otsu_images() -> Vec<(String, usize, usize, Vec<u8>)> {
    let mut rng = ChaCha8Rng::seed_from_u64(1979);
    let mut images = Vec::new();
    for (index, (modes, weights)) in [
        (&[60.0, 190.0][..], &[0.5, 0.5][..]),
        (&[40.0, 120.0][..], &[0.9, 0.1][..]),
        (&[30.0, 110.0, 220.0][..], &[0.3, 0.3, 0.4][..]),
        (&[100.0, 140.0][..], &[0.2, 0.8][..]),
        (&[5.0, 250.0][..], &[0.5, 0.5][..]),
    ]
    .iter()
    .enumerate()
    {
        for spread in [20.0, 60.0, 140.0] {
            let (width, height) = (64, 48);
            let pixels = (0..width * height)
                .map(|_| {
                    let pick = rng.next_u32() as f64 / u32::MAX as f64;
                    let mut total = 0.0;
                    let mut mode = modes[0];
                    for (m, w) in modes.iter().zip(weights.iter()) {
                        total += w;
                        mode = *m;
                        if pick <= total {
                            break;
                        }
                    }
                    near(&mut rng, mode, spread)
                })
                .collect();
            images.push((format!("otsu-mix{index}-{spread}"), width, height, pixels));
        }
    }
    images.push((
        "otsu-ramp".into(),
        256,
        4,
        (0..1024).map(|i| (i % 256) as u8).collect(),
    ));
    images.push((
        "otsu-narrow".into(),
        50,
        50,
        (0..2500)
            .map(|_| 100 + (rng.next_u32() % 11) as u8)
            .collect(),
    ));
    images.push((
        "otsu-two-levels".into(),
        20,
        20,
        (0..400)
            .map(|i| if i % 3 == 0 { 30 } else { 200 })
            .collect(),
    ));
    let mut disk = disk_image(90, 30.0);
    disk.blur(2);
    images.push(("otsu-blurred-disk".into(), 90, 90, disk.grey()));
    let mut lit: Canvas = disk_image(90, 25.0);
    lit.lighting(0.6, 1.0, 0.8);
    images.push(("otsu-lit-disk".into(), 90, 90, lit.grey()));
    images
}

#[test]
fn otsu_and_skeletons_agree_with_scikit_image() {
    let folder = folder();
    let _ = std::fs::remove_dir_all(&folder);
    std::fs::create_dir_all(&folder).expect("target/skimage-check can be made");
    let mut ours_otsu = Vec::new();
    for (name, width, height, pixels) in otsu_images() {
        std::fs::write(
            folder.join(format!("{name}.pgm")),
            encode_pgm(width, height, &pixels),
        )
        .unwrap();
        let threshold = otsu_threshold(&histogram(&pixels, None)).expect("pixels");
        ours_otsu.push((name, threshold));
    }
    let mut shapes = skeleton_shapes();
    // The vein mask of the shipped demo image, as the cleared-leaf steps find it.
    let demo = std::fs::read(
        PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("../examples/specimens/cleared-leaf.png"),
    )
    .expect("the demo image");
    let image = decode_image(&demo).expect("decodes");
    let leaf = analyse_cleared_leaf(&image, &ClearedOptions::default()).expect("reads");
    shapes.push((
        "demo-leaf-veins",
        image.width as usize,
        image.height as usize,
        leaf.vein_mask,
    ));
    for (name, width, height, mask) in &shapes {
        let grey =
            |on: &[bool]| -> Vec<u8> { on.iter().map(|&b| if b { 255 } else { 0 }).collect() };
        std::fs::write(
            folder.join(format!("shape-{name}.pgm")),
            encode_pgm(*width, *height, &grey(mask)),
        )
        .unwrap();
        let mut skeleton = mask.clone();
        zhang_suen_thin(&mut skeleton, *width, *height);
        remove_staircase_corners(&mut skeleton, *width, *height);
        std::fs::write(
            folder.join(format!("ours-{name}.pgm")),
            encode_pgm(*width, *height, &grey(&skeleton)),
        )
        .unwrap();
    }
    let script = PathBuf::from(env!("CARGO_MANIFEST_DIR")).join("reference/skimage_cleared.py");
    let output = Command::new("python3")
        .arg(&script)
        .arg(&folder)
        .output()
        .unwrap_or_else(|error| {
            panic!("cannot run python3 for the scikit-image checks ({error}); install Python 3")
        });
    assert!(
        output.status.success(),
        "the scikit-image reference script failed (status {:?}); its message:\n{}",
        output.status.code(),
        String::from_utf8_lossy(&output.stderr)
    );
    let answer: serde_json::Value =
        serde_json::from_slice(&output.stdout).expect("the script prints one JSON object");
    let mut mismatches = Vec::new();
    for (name, ours) in &ours_otsu {
        let theirs = answer["otsu"][name].as_u64();
        if theirs != Some(u64::from(*ours)) {
            mismatches.push(format!("{name}: Otsu ours {ours}, scikit-image {theirs:?}"));
        }
    }
    for (name, _, _, _) in &shapes {
        let entry = &answer["topology"][*name];
        let counts = |side: &str| -> Vec<i64> {
            entry[side]
                .as_array()
                .map(|list| list.iter().filter_map(|v| v.as_i64()).collect())
                .unwrap_or_default()
        };
        let (ours, theirs) = (counts("ours"), counts("skimage"));
        // Drawn shapes: exactly. The demo's vein mask has ragged, blurred edges where the two
        // thinning rules may keep a one-pixel spur differently: end and branch points may
        // differ by 2 % + 1, loops not at all (a tolerance of our choosing; no source).
        let agree = ours.len() == 3
            && theirs.len() == 3
            && if name.starts_with("demo") {
                (0..2).all(|k| (ours[k] - theirs[k]).abs() <= theirs[k] / 50 + 1)
                    && ours[2] == theirs[2]
            } else {
                ours == theirs
            };
        if !agree {
            mismatches.push(format!(
                "{name}: skeleton [end points, branch points, loops] ours {}, scikit-image {}",
                entry["ours"], entry["skimage"]
            ));
        }
    }
    println!(
        "scikit-image {}: {} Otsu thresholds and {} skeleton topologies compared",
        answer["skimage_version"],
        ours_otsu.len(),
        shapes.len()
    );
    assert!(mismatches.is_empty(), "{}", mismatches.join("\n"));
}
