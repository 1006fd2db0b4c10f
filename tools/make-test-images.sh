#!/usr/bin/env bash
# Regenerates the invented demo images in test-images/ with the simulate operation (deterministic: same seed,
# same bytes). Build first: mvn -B -q -DskipTests package
set -euo pipefail
cd "$(dirname "$0")/.."
sw() { java -jar target/stackwright.jar "$@"; }
out=test-images
mkdir -p "$out"
# 3D widefield-like stack of an invented cell field: 16-bit camera data, float truth, the PSF used.
sw simulate --overwrite --specimen cells --size 128x128x32 --pixel 0.08 --step 0.2 --na 1.0 --wavelength 520 \
   --immersion-index 1.33 --background 10 --gain 1 --offset 100 --read-noise 2 --bits 16 --seed 1 \
   --output "$out/demo-cells.tif" --truth "$out/demo-cells-truth.tif" --psf-output "$out/demo-psf.tif"
# 3D bead slide for PSF measurement: 12 sub-resolution beads dried in one layer (some too close to each other).
sw simulate --overwrite --specimen beads --beads 12 --size 128x128x48 --pixel 0.08 --step 0.2 --na 1.0 \
   --wavelength 520 --immersion-index 1.33 --background 5 --offset 100 --read-noise 2 --bits 16 --seed 2 \
   --output "$out/demo-beads.tif"
# 2D tiled acquisition, 3 rows x 4 columns with 4-pixel seams, and 20 hot, 20 dead and 20 stuck pixels.
sw simulate --overwrite --specimen cells --size 512x384x1 --pixel 0.1 --step 0.2 --na 0.8 --wavelength 520 \
   --immersion-index 1.0 --brightness 2 --background 20 --offset 100 --read-noise 2 --bits 16 --seed 3 \
   --grid 3x4 --seam-width 4 --defects 20 \
   --output "$out/demo-tiles.tif" --truth "$out/demo-tiles-truth.tif" --mask-output "$out/demo-tiles-damage.tif"
ls -l "$out"
