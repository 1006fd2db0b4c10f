// Stackwright: repair a tiled acquisition before segmentation: mask the tile seams from the known grid, find
// defective camera pixels, and fill both by harmonic inpainting.
//
// Writes into the output folder: <name>-repair-mask.tif (255 = pixel that was filled: EXCLUDE these pixels from
// every measurement), <name>-inpaint.tif (the repaired image) and <name>-repair.csv (the run table).
//
// The demo image test-images/demo-tiles.tif is 512 x 384 pixels, 3 rows x 4 columns of 128 x 128 tiles without
// overlap, with 4-pixel seams and planted hot, dead and stuck pixels. Set the grid for your own acquisition.
//
// Arguments (all optional): "images=[DIR] output=[DIR] file=NAME". Without arguments it repairs
// test-images/demo-tiles.tif into demo-output/repair-tiles/ in the working folder.
//
// Caution: inpainted pixels are estimates invented from their surroundings, not measurements.

GRID = "3x4";          // tile rows x columns
TILE = "128x128";      // tile width x height in pixels
OVERLAP = 0;           // tile overlap in pixels
SEAM_WIDTH = 4;        // width of the band masked along each seam, in pixels
THRESHOLD = 6;         // defective-pixel threshold in robust standard deviations
METHOD = "harmonic";   // harmonic (seams, small holes), biharmonic (smoother), total-variation (keeps edges), median

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
if (output == "" && demo) output = defaultOutput("repair-tiles");
if (output == "") output = images + "repaired" + File.separator;
output = withSeparator(output);
file = option(args, "file", "demo-tiles.tif");
makeDirectories(output);
setBatchMode(true);

openInput(images + file);
title = getTitle();
base = File.getNameWithoutExtension(title);

// 1. Seam mask from the tile layout.
run("Tile Seam Mask...", "grid=" + GRID + " tile=" + TILE + " overlap=" + OVERLAP + " seam-width=" + SEAM_WIDTH);
seams = getTitle();

// 2. Defective pixels found in the image itself.
selectImage(title);
run("Find Defective Pixels...", "input=[" + title + "] threshold=" + THRESHOLD);
defects = getTitle();

// 3. One mask of everything to fill (8-bit, 255 = untrusted).
imageCalculator("OR create", seams, defects);
rename(base + "-repair-mask");
mask = getTitle();
saveAs("Tiff", output + base + "-repair-mask.tif");
mask = getTitle();

// 4. Fill the masked pixels; trusted pixels are returned unchanged.
run("Fill Masked Pixels...", "input=[" + title + "] mask=[" + mask + "] method=" + METHOD);
selectImage(base + "-inpaint");
saveAs("Tiff", output + base + "-inpaint.tif");
Table.save(output + base + "-repair.csv", "Stackwright Runs");
close("*");
print("Repaired " + title + " into " + output + "; exclude the pixels of " + base + "-repair-mask.tif from measurements.");

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
