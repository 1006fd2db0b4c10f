// Stackwright: deconvolve every TIFF in a folder with a modelled PSF, unattended.
//
// For each file: model a widefield PSF for that file's own voxel size (Image>Properties must be right), run
// Richardson-Lucy with the noise-based stop, save <name>-deconvolve.tif and the run record <name>-run.json into
// the output folder. At the end the table "Stackwright Runs" (one row per file: every setting, iterations done,
// stop reason) is saved as runs.csv. Files that are not calibrated z-stacks are skipped and listed in
// skipped.txt; an error during a run stops the macro with a message naming the setting (files already written
// are complete: every output is written whole or not at all).
//
// Run it from Plugins>Macros>Run..., or unattended on a server (ImageJ 1.x needs a display, so give it a
// virtual one):
//   xvfb-run -a java -Dplugins.dir=ImageJ/plugins -jar ImageJ/ij.jar -batch batch-deconvolve-folder.ijm \
//       "images=[/data/in] output=[/data/out]"
// Without arguments it deconvolves the demo images in test-images/ beside this macros/ folder into
// demo-output/batch-deconvolve/ in the working folder. Files whose name contains "bead" are skipped (bead stacks
// are for PSF from Beads), as are the demo's truth, PSF and damage files.
//
// Caution: deconvolved pixels are estimates, not measurements. Check the residuals (Plugins>Stackwright>Inspect)
// before you measure, and follow your facility's validated protocol where it differs.

// ---- settings: change these for your microscope ----
NA = 1.0;              // numerical aperture of the objective
WAVELENGTH = 520;      // emission wavelength (nm)
IMMERSION = 1.33;      // refractive index of the immersion medium
MODEL = "gaussian";    // PSF model: gaussian, widefield, gibson-lanni, confocal, two-photon
                       // (the demo data were made with the Gaussian approximation; use widefield or
                       //  gibson-lanni for real widefield data)
PSF_SIZE = "33x33x21"; // PSF extent in voxels (odd sizes)
OFFSET = 100;          // camera offset (ADU): part of the model, never subtract it yourself
READ_NOISE = 2;        // camera read noise (ADU, standard deviation): the noise-based stop needs it
ITERATIONS = 50;       // the most iterations; the noise-based stop usually ends earlier
// -----------------------------------------------------

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
if (output == "" && demo) output = defaultOutput("batch-deconvolve");
if (output == "") output = images + "deconvolved" + File.separator;
ITERATIONS = parseInt(option(args, "iterations", "" + ITERATIONS));
output = withSeparator(output);
makeDirectories(output);

setBatchMode(true);
list = getFileList(images);
skipped = "";
done = 0;
for (i = 0; i < list.length; i++) {
    name = list[i];
    if (!endsWith(toLowerCase(name), ".tif") && !endsWith(toLowerCase(name), ".tiff")) continue;
    if (indexOf(name, "-truth") >= 0 || indexOf(name, "-psf") >= 0 || indexOf(name, "-damage") >= 0) continue;
    if (indexOf(toLowerCase(name), "bead") >= 0) {   // bead stacks make PSFs (psf-from-beads-then-deconvolve.ijm)
        skipped = skipped + name + ": a bead stack (for PSF from Beads), not a specimen\n";
        continue;
    }
    openInput(images + name);
    title = getTitle();
    base = File.getNameWithoutExtension(title);
    if (nSlices < 2) {                  // this macro is for z-stacks
        skipped = skipped + name + ": not a z-stack\n";
        close(title);
        continue;
    }
    getVoxelSize(pw, ph, pd, unit);
    if (!startsWith(unit, "micron") && unit != "um" && unit != "µm") {
        skipped = skipped + name + ": not calibrated in micrometres (Image>Properties)\n";
        close(title);
        continue;
    }
    // 1. a PSF for this file's voxel size
    run("Model PSF...", "model=" + MODEL + " na=" + NA + " wavelength=" + WAVELENGTH
        + " immersion-index=" + IMMERSION + " pixel=" + pw + " step=" + pd + " size=" + PSF_SIZE);
    psf = getTitle();
    // 2. deconvolve; the run record goes next to the result
    selectImage(title);
    run("Deconvolve Stack...", "input=[" + title + "] psf=[" + psf + "] method=richardson-lucy iterations="
        + ITERATIONS + " stop=noise offset=" + OFFSET + " read-noise=" + READ_NOISE + " background=auto boundary=extended acceleration=on"
        + " record=[" + output + base + "-run.json] overwrite");
    selectImage(base + "-deconvolve");
    saveAs("Tiff", output + base + "-deconvolve.tif");
    close("*");
    done++;
}
if (isOpen("Stackwright Runs")) Table.save(output + "runs.csv", "Stackwright Runs");
if (skipped != "") File.saveString(skipped, output + "skipped.txt");
print("Deconvolved " + done + " files into " + output);
if (skipped != "") print("Skipped:\n" + skipped);

// Reads key=value or key=[value with spaces] from the macro argument.
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
