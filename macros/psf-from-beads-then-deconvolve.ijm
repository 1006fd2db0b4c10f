// Stackwright: measure the PSF from a bead stack, check its width, then deconvolve a specimen with it.
//
// A measured PSF includes the aberrations of your own microscope and is preferred over a modelled one for
// quantitative work. Image beads of sub-resolution size (e.g. 100 nm or smaller) with the same objective,
// immersion, wavelength and voxel size as the specimen.
//
// Writes into the output folder: <beads>-psf.tif (the averaged PSF), psf-width.csv (FWHM in x, y, z, um),
// <specimen>-deconvolve.tif and <specimen>-run.json (the run record: settings, iterations, stop reason, history).
//
// Arguments (all optional): "images=[DIR] output=[DIR] beads=FILE specimen=FILE"
// Without arguments it uses test-images/demo-beads.tif and test-images/demo-cells.tif.
//
// Caution: deconvolved pixels are estimates, not measurements; follow your facility's validated protocol.

BEAD_DIAMETER = 0;     // bead diameter in um to correct for (0 = no correction)
PSF_SIZE = "25x25x21"; // extent of the averaged PSF in voxels (odd sizes; beads nearer an edge are rejected)
OFFSET = 100;          // camera offset (ADU)
READ_NOISE = 2;        // camera read noise (ADU, standard deviation): the noise-based stop needs it
ITERATIONS = 30;

args = getArgument();
images = option(args, "images", "");
if (images == "") images = defaultImages();
images = withSeparator(images);
output = withSeparator(option(args, "output", images + "deconvolved" + File.separator));
beads = option(args, "beads", "demo-beads.tif");
specimen = option(args, "specimen", "demo-cells.tif");
File.makeDirectory(output);
setBatchMode(true);

// 1. PSF from the bead stack: isolated beads are found, aligned with sub-voxel shifts and averaged.
open(images + beads);
beadTitle = getTitle();
run("PSF from Beads...", "input=[" + beadTitle + "] size=" + PSF_SIZE + " bead-diameter=" + BEAD_DIAMETER);
psf = getTitle();
saveAs("Tiff", output + File.getNameWithoutExtension(beadTitle) + "-psf.tif");
psf = getTitle();   // saveAs renames the window to the file name

// 2. Check its width before trusting it: compare with what your objective should give.
run("Measure PSF Width...", "input=[" + psf + "]");
if (isOpen("measure-psf results")) Table.save(output + "psf-width.csv", "measure-psf results");
else Table.save(output + "psf-width.csv", "Stackwright Runs");

// 3. Deconvolve the specimen with the measured PSF (resampled with a note if its voxel size differs).
open(images + specimen);
title = getTitle();
base = File.getNameWithoutExtension(title);
run("Deconvolve Stack...", "input=[" + title + "] psf=[" + psf + "] method=richardson-lucy iterations=" + ITERATIONS
    + " stop=noise offset=" + OFFSET + " read-noise=" + READ_NOISE + " background=auto boundary=extended acceleration=on"
    + " record=[" + output + base + "-run.json] overwrite");
selectImage(base + "-deconvolve");
saveAs("Tiff", output + base + "-deconvolve.tif");
close("*");
print("PSF and deconvolved stack written to " + output);

function option(text, key, fallback) {
    padded = " " + text;
    at = indexOf(padded, " " + key + "=");
    if (at < 0) return fallback;
    value = substring(padded, at + lengthOf(key) + 2);
    if (startsWith(value, "[")) return substring(value, 1, indexOf(value, "]"));
    end = indexOf(value, " ");
    if (end < 0) return value;
    return substring(value, 0, end);
}

function defaultImages() {
    path = getInfo("macro.filepath");
    if (path != "null" && path != "") {
        dir = File.getParent(File.getParent(path)) + File.separator + "test-images" + File.separator;
        if (File.exists(dir)) return dir;
    }
    return getDirectory("Choose the folder with the bead and specimen stacks");
}

function withSeparator(dir) {
    if (endsWith(dir, "/") || endsWith(dir, "\\")) return dir;
    return dir + File.separator;
}
