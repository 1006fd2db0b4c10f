package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;

import ij.IJ;
import ij.ImagePlus;
import ij.ImageStack;
import ij.WindowManager;
import ij.measure.Calibration;
import ij.measure.ResultsTable;
import ij.process.FloatProcessor;

import org.junit.jupiter.api.AfterEach;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * The ImageJ 1.x door in real ImageJ under a display (Xvfb in CI): macros through the menu command names,
 * batch mode, hyperstacks channel by channel, cancel, errors that abort the macro with a message, the run table,
 * the convergence plot and the run record.
 */
class ImageJDoorTest {

    @TempDir
    Path dir;

    @BeforeAll
    static void start() throws Exception {
        ImageJHarness.start();
    }

    @AfterEach
    void close() {
        ImageJHarness.closeAll();
    }

    @Test
    void simulateInBatchModeMakesHiddenCalibratedImages() {
        String err = ImageJHarness.runMacro("setBatchMode(true);\n"
                + "run(\"Simulate Specimen...\", \"specimen=beads size=32x24x6 pixel=0.1 step=0.25 seed=4 truth\");\n"
                + "if (nImages != 2) exit('expected 2 images, got ' + nImages);\n"
                + "selectImage('simulate'); if (getWidth() != 32) exit('bad width');\n"
                + "shown = call('org.stackwright.imagej.ImageJDoorTest.visibleImageWindows');\n"
                + "if (shown != '0') exit('batch mode showed ' + shown + ' image windows');\n"
                + "setBatchMode('exit and display');\n", "");
        assertNull(err, err);
        ImagePlus out = WindowManager.getImage("simulate");
        assertNotNull(out);
        assertEquals(6, out.getNSlices());
        assertEquals(0.1, out.getCalibration().pixelWidth, 1e-12);
        assertEquals(0.25, out.getCalibration().pixelDepth, 1e-12);
        assertNotNull(WindowManager.getImage("simulate-truth"));
    }

    @Test
    void hyperstackIsProcessedPerChannelAndKeepsDimensionsAndCalibration() {
        ImagePlus in = hyperstack("cells", 2, 3, 2);
        in.show();
        ImagePlus psf = hyperstack("psf2", 2, 1, 1);
        psf.show();
        String before = Arrays.toString(hashes(in));
        String err = ImageJHarness.runMacro("setBatchMode(true); run(\"Offset Test...\", "
                + "\"input=cells psf=psf2 wavelength=500,600 iterations=2\"); setBatchMode('exit and display');", "");
        assertNull(err, err);
        ImagePlus out = WindowManager.getImage("cells-test-offset");
        assertNotNull(out, "output titled <title>-<operation>");
        assertArrayEquals(new int[] {8, 6, 2, 3, 2}, out.getDimensions());
        Calibration c = out.getCalibration();
        assertEquals(0.09, c.pixelWidth, 1e-12);
        assertEquals(0.3, c.pixelDepth, 1e-12);
        assertEquals(2.5, c.frameInterval, 1e-12);
        for (int t = 1; t <= 2; t++) {
            for (int ch = 1; ch <= 2; ch++) {
                double psfSum = 0;
                float[] p = (float[]) psf.getStack().getPixels(psf.getStackIndex(ch, 1, 1));
                for (float f : p) {
                    psfSum += f;
                }
                double add = (ch == 1 ? 500 : 600) + psfSum;
                for (int z = 1; z <= 3; z++) {
                    float[] a = (float[]) in.getStack().getPixels(in.getStackIndex(ch, z, t));
                    float[] b = (float[]) out.getStack().getPixels(out.getStackIndex(ch, z, t));
                    for (int i = 0; i < a.length; i++) {
                        assertEquals((float) (a[i] + add), b[i], "c" + ch + " z" + z + " t" + t + " i" + i);
                    }
                }
            }
        }
        assertEquals(before, Arrays.toString(hashes(in)), "input unchanged");
        ResultsTable rt = ResultsTable.getResultsTable(RunReport.TABLE);
        assertNotNull(rt);
        assertTrue(rt.size() >= 4, "one row per channel and time point");
        int last = rt.size() - 1;
        assertEquals("test-offset", rt.getStringValue("operation", last));
        assertEquals(600, rt.getValue("wavelength", last), 0);
        assertEquals(2, rt.getValue("channel", last), 0);
        assertEquals(2, rt.getValue("frame", last), 0);
        assertEquals(2, rt.getValue("record.iterations", last), 0);
        assertEquals("fixed", rt.getStringValue("record.stop_reason", last));
        ResultsTable rows = ResultsTable.getResultsTable("test-offset results");
        assertNotNull(rows, "the operation's own rows");
        int lastRow = rows.size() - 1;
        assertEquals(2, rows.getValue("channel", lastRow), 0);
        assertEquals(2, rows.getValue("frame", lastRow), 0);
        assertTrue(rows.getValue("added", lastRow) > 600, "channel 2 adds 600 plus its PSF's sum");
    }

    @Test
    void aMacroWithoutKeysUsesTheDefaultsAndTheCurrentImage() {
        ImagePlus other = hyperstack("other", 1, 2, 1);
        other.show();
        ImagePlus current = hyperstack("current", 1, 2, 1);
        current.show();
        String err = ImageJHarness.runMacro("selectImage('current'); run(\"Offset Test...\", \" \");", "");
        assertNull(err, err);
        ImagePlus out = WindowManager.getImage("current-test-offset");
        assertNotNull(out, "the current image is the default input");
        float in0 = ((float[]) current.getStack().getPixels(1))[0];
        assertEquals(in0 + 500f, ((float[]) out.getStack().getPixels(1))[0], "default wavelength 500 added");
    }

    @Test
    void outsideBatchModeAConvergencePlotIsShownAndTheOutputIsCurrent() {
        ImagePlus in = hyperstack("plain", 1, 2, 1);
        in.show();
        String err = ImageJHarness.runMacro("run(\"Offset Test...\", \"input=plain iterations=5\");"
                + "if (getTitle() != 'plain-test-offset') exit('current image is ' + getTitle());", "");
        assertNull(err, err);
        ImagePlus plot = WindowManager.getImage("plain-test-offset convergence");
        assertNotNull(plot, "convergence plot");
        assertNotNull(plot.getWindow(), "shown");
    }

    @Test
    void cancelAtIterationThreeLeavesInputAndMakesNoOutput() {
        ImagePlus in = hyperstack("stack", 1, 4, 1);
        in.show();
        String before = Arrays.toString(hashes(in));
        String err = ImageJHarness.runMacro("run(\"Offset Test...\", \"input=stack iterations=10 cancel-at=3\");", "");
        assertNotNull(err, "the macro is aborted");
        assertTrue(err.contains("cancelled"), err);
        assertEquals(before, Arrays.toString(hashes(in)), "input unchanged");
        for (int id : WindowManager.getIDList()) {
            String t = WindowManager.getImage(id).getTitle();
            assertTrue(t.equals("stack"), "unexpected image after cancel: " + t);
        }
        IJ.resetEscape();
    }

    @Test
    void badValuesAbortTheMacroWithAMessageNamingTheKey() {
        String err = ImageJHarness.runMacro("run(\"Simulate Specimen...\", \"size=8x8x2 na=5\"); print('went on');", "");
        assertNotNull(err);
        assertTrue(err.contains("na = 5") && err.contains("allowed"), err);
        err = ImageJHarness.runMacro("run(\"Simulate Specimen...\", \"size=8x8x2 wavelenght=500\");", "");
        assertNotNull(err);
        assertTrue(err.contains("wavelenght") && err.contains("allowed"), err);
        err = ImageJHarness.runMacro("run(\"Simulate Specimen...\", \"size=8x8x2 specimen=stars\");", "");
        assertTrue(err != null && err.contains("specimen") && err.contains("cells, beads"), err);
        assertEquals(0, WindowManager.getImageCount());
    }

    @Test
    void keysThatEndAlikeReadTheirOwnValues() {
        ImagePlus in = hyperstack("a b", 1, 2, 1);
        in.show();
        String err = ImageJHarness.runMacro("setBatchMode(true); run(\"Offset Test...\", "
                + "\"extra input=[a b] method=[other words] note=[x y] verbose record=[" + dir.resolve("r.json") + "]\");"
                + " setBatchMode('exit and display');", "");
        assertNull(err, err);
        assertNotNull(WindowManager.getImage("a b-test-offset"));
        assertNotNull(WindowManager.getImage("a b-test-offset-extra"));
        assertTrue(IJ.getLog().contains("test-offset warning: verbose is on"), "warnings go to the Log");
    }

    @Test
    void runRecordIsWrittenAndNotOverwrittenUnlessAsked() throws Exception {
        ImagePlus in = hyperstack("rec", 1, 2, 1);
        in.show();
        Path rec = dir.resolve("run.json");
        String macro = "setBatchMode(true); run(\"Offset Test...\", \"input=rec iterations=3 record=[" + rec + "]%s\");";
        assertNull(ImageJHarness.runMacro(String.format(macro, ""), ""));
        String json = Files.readString(rec);
        assertTrue(json.contains("\"stop_reason\": \"fixed\"") && json.contains("\"history\": [1, 0.5, 0.333333333]"), json);
        String err = ImageJHarness.runMacro(String.format(macro, ""), "");
        assertTrue(err != null && err.contains("record") && err.contains("exists"), err);
        assertNull(ImageJHarness.runMacro(String.format(macro, " overwrite"), ""));
    }

    static ImagePlus hyperstack(String title, int nc, int nz, int nt) {
        return ImageJDoorTestData.hyperstack(title, nc, nz, nt);
    }

    static int[] hashes(ImagePlus imp) {
        int[] h = new int[imp.getStackSize()];
        for (int i = 0; i < h.length; i++) {
            Object p = imp.getStack().getPixels(i + 1);
            h[i] = p instanceof float[] f ? Arrays.hashCode(f) : Arrays.hashCode((short[]) p);
        }
        return h;
    }

    /** Called from a macro: the number of image windows on screen. */
    public static String visibleImageWindows() {
        int n = 0;
        for (java.awt.Frame f : java.awt.Frame.getFrames()) {
            if (f instanceof ij.gui.ImageWindow && f.isShowing()) {
                n++;
            }
        }
        return Integer.toString(n);
    }
}
