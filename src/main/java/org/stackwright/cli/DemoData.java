package org.stackwright.cli;

import java.io.IOException;
import java.io.InputStream;
import java.io.UncheckedIOException;
import java.nio.file.Path;
import java.util.LinkedHashMap;
import java.util.Map;

import ij.ImagePlus;
import ij.io.Opener;

import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.simulate.SimulateOperation;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.TiffFiles;
import org.stackwright.volume.Volume;

/**
 * The demo's images. The camera data and the PSF travel in the command-line jar (resources {@code /demo/}, copies
 * of test-images/demo-cells.tif and demo-psf.tif), so the jar alone runs the demo in any folder. The invented
 * truth (2 MB of float noise-free photons that hardly compress) is not carried: it is drawn again by
 * {@code simulate} with the settings of tools/make-test-images.sh, which gives the same bits as
 * test-images/demo-cells-truth.tif (a test checks it). With {@code --images DIR} all three are read from the folder.
 */
final class DemoData {

    /** The simulate settings of demo-cells.tif, as in tools/make-test-images.sh. */
    static final Map<String, String> CELLS = settings("specimen", "cells", "size", "128x128x32", "pixel", "0.08",
            "step", "0.2", "na", "1.0", "wavelength", "520", "immersion-index", "1.33", "background", "10", "gain", "1",
            "offset", "100", "read-noise", "2", "bits", "16", "seed", "1");

    /** The demo's data, its PSF and the truth it was made from. */
    record Images(Volume data, Volume psf, Volume truth, String where) {
    }

    private DemoData() {
    }

    private static Map<String, String> settings(String... kv) {
        Map<String, String> m = new LinkedHashMap<>();
        for (int i = 0; i < kv.length; i += 2) {
            m.put(kv[i], kv[i + 1]);
        }
        return Map.copyOf(m);
    }

    /** @return the images carried in the jar, with the truth drawn again */
    static Images bundled(int threads) {
        Volume data = resource("demo-cells.tif");
        Volume psf = resource("demo-psf.tif");
        return new Images(data, psf, truth(threads), "the images inside stackwright.jar");
    }

    /** @return the three demo images of a folder (demo-cells.tif, demo-psf.tif, demo-cells-truth.tif) */
    static Images folder(Path dir) {
        return new Images(TiffFiles.read(dir.resolve("demo-cells.tif"), "--images"),
                TiffFiles.read(dir.resolve("demo-psf.tif"), "--images"),
                TiffFiles.read(dir.resolve("demo-cells-truth.tif"), "--images"), dir.toString());
    }

    /** @return the truth of demo-cells.tif, drawn by simulate with its settings */
    static Volume truth(int threads) {
        SimulateOperation sim = new SimulateOperation();
        Values v = Values.parse(sim.name(), sim.params(), CELLS);
        Result r = sim.run(v, new RunContext(threads, (f, s) -> { }, w -> { }, null));
        return ImagePlusAdapter.toVolume(r.images().get("truth"));
    }

    private static Volume resource(String name) {
        try (InputStream in = DemoData.class.getResourceAsStream("/demo/" + name)) {
            if (in == null) {
                throw new IllegalArgumentException("the demo image " + name + " is not inside this jar; give "
                        + "--images with the folder test-images/ of the source tree");
            }
            ImagePlus imp = new Opener().openTiff(in, name);
            if (imp == null) {
                throw new IllegalStateException("could not read the demo image " + name + " inside the jar");
            }
            return ImagePlusAdapter.toVolume(imp);
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
    }
}
