#!/usr/bin/env bash
# Redraws the preset pictures in docs/presets/ (README): SVG from `ramulus grow`, then PNG with
# rsvg-convert (Debian package librsvg2-bin).
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --release -q -p ramulus-cli
command -v rsvg-convert >/dev/null || apt-get install -y librsvg2-bin
work="$(mktemp -d)"
for preset in ovate-leaf elliptic-leaf lanceolate-leaf filled-outline drainage-site spanning-tree; do
  target/release/ramulus grow --preset "$preset" --svg "$work/$preset.svg" > /dev/null
  rsvg-convert -w 420 "$work/$preset.svg" -o "docs/presets/$preset.png"
done
# The ovate leaf as a cleared leaf looks: every vein alike, width to scale, so loops show.
target/release/ramulus grow --preset ovate-leaf --colour plain --svg "$work/ovate-leaf-veins.svg" > /dev/null
rsvg-convert -w 840 "$work/ovate-leaf-veins.svg" -o docs/presets/ovate-leaf-veins.png
rm -rf "$work"
