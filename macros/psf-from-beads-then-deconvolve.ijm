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
// Without arguments it uses test-images/demo-beads.tif and test-images/demo-cells.tif and writes into
// demo-output/psf-from-beads/ in the working folder.
//
// Caution: deconvolved pixels are estimates, not measurements; follow your facility's validated protocol.

BEAD_DIAMETER = 0;     // bead diameter in um to correct for (0 = no correction)
PSF_SIZE = "25x25x21"; // extent of the averaged PSF in voxels (odd sizes; beads nearer an edge are rejected)
OFFSET = 100;          // camera offset (ADU)
READ_NOISE = 2;        // camera read noise (ADU, standard deviation): the noise-based stop needs it
ITERATIONS = 30;

// With no one at the screen (ImageJ -batch), an ImageJ error from here on ends the run with the message on
// stderr and exit code 1 instead of a window that waits for a click.
call("org.stackwright.imagej.MacroCalls.guard");
args = getArgument();
images = option(args, "images", "");
demo = false;
if (images == "") demo = true;
if (demo) images = defaultImages();
images = withSeparator(images);
output = option(args, "output", "");
if (output == "" && demo) output = defaultOutput("psf-from-beads");
if (output == "") output = images + "deconvolved" + File.separator;
output = withSeparator(output);
beads = option(args, "beads", "demo-beads.tif");
specimen = option(args, "specimen", "demo-cells.tif");
makeDirectories(output);
setBatchMode(true);

// 1. PSF from the bead stack: isolated beads are found, aligned with sub-voxel shifts and averaged.
openInput(images + beads);
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
openInput(images + specimen);
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

// The bundled demo images: test-images/ beside the macros/ folder this file is in. getInfo("macro.filepath")
// is relative when ImageJ was started with "-batch macros/NAME.ijm", so it is resolved against the working folder.
function defaultImages() {
    path = getInfo("macro.filepath");
    if (path != "null" && path != "") {
        if (!startsWith(path, "/") && !startsWith(path, "\\") && indexOf(path, ":") != 1)
            path = getInfo("user.dir") + File.separator + path;
        dir = File.getParent(File.getParent(path)) + File.separator + "test-images" + File.separator;
        if (File.exists(dir)) return dir;
    }
    fail("no images given and the demo images (test-images/ beside the macros/ folder) were not found; "
        + "run it with the argument \"images=[/path/to/folder] output=[/path/to/results]\"");
}

// Results of a run without arguments go to demo-output/ in the working folder, never into the source tree.
function defaultOutput(name) {
    return getInfo("user.dir") + File.separator + "demo-output" + File.separator + name + File.separator;
}

// Stops with an error: unattended (ImageJ -batch) on stderr with a non-zero exit code, otherwise in a window.
function fail(message) {
    call("org.stackwright.imagej.MacroCalls.fail", message);
    exit(message);
}

// Opens a file of the input folder, or stops with an error naming it (ImageJ's own error would wait for a click).
function openInput(path) {
    if (!File.exists(path)) fail("input file not found: " + path);
    open(path);
}

// Makes a folder and the folder it is in (File.makeDirectory makes one level only).
function makeDirectories(dir) {
    parent = File.getParent(dir);
    if (parent != "" && !File.exists(parent)) makeDirectories(parent);
    File.makeDirectory(dir);
    if (!File.isDirectory(dir)) fail("could not make the output folder " + dir);
}

function withSeparator(dir) {
    if (endsWith(dir, "/") || endsWith(dir, "\\")) return dir;
    return dir + File.separator;
}
