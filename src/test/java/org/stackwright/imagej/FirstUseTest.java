package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.awt.Button;
import java.awt.Checkbox;
import java.awt.Choice;
import java.awt.Component;
import java.awt.EventQueue;
import java.awt.TextField;
import java.awt.event.ActionEvent;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.Arrays;
import java.util.HashMap;
import java.util.Iterator;
import java.util.List;
import java.util.Map;

import ij.IJ;
import ij.ImagePlus;
import ij.WindowManager;
import ij.gui.GenericDialog;
import ij.measure.ResultsTable;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.registry.Operations;

/**
 * A first session in real ImageJ, through the menus and dialogs a person uses: checkbox outputs are made, the PSF
 * choice starts on an image that looks like a PSF and RGB pictures are not offered, a dialog remembers what was
 * confirmed in it (a macro does not), the residual view after a deconvolution starts on its data, result, PSF and
 * camera values, and the table of runs leaves settings of other operations empty and shows the background used.
 */
class FirstUseTest {

    @TempDir
    static Path dir;

    @BeforeAll
    static void start() throws Exception {
        ImageJHarness.start();
        SessionMemory.clear();
        String err = ImageJHarness.runMacro("run('Simulate Specimen...', 'size=32x32x24 pixel=0.1 step=0.25 "
                + "offset=100 read-noise=2 background=10 seed=5 psf-output truth');"
                + "newImage('picture', 'RGB ramp', 64, 64, 1);", "");
        assertNull(err, err);
    }

    @AfterAll
    static void stop() {
        ImageJHarness.closeAll();
    }

    /** The fields of a shown dialog by key, in the order OperationDialog built them. */
    private static Map<String, Component> fields(GenericDialog gd, Operation op) {
        Map<String, Component> m = new HashMap<>();
        Iterator<?> texts = gd.getStringFields() == null ? List.of().iterator() : gd.getStringFields().iterator();
        Iterator<?> choices = gd.getChoices() == null ? List.of().iterator() : gd.getChoices().iterator();
        Iterator<?> boxes = gd.getCheckboxes() == null ? List.of().iterator() : gd.getCheckboxes().iterator();
        for (Param p : OperationDialog.dialogOrder(op)) {
            m.put(p.key(), (Component) switch (p.kind()) {
                case IMAGE, CHOICE -> choices.next();
                case FLAG, OUTPUT_IMAGE -> boxes.next();
                default -> texts.next();
            });
        }
        return m;
    }

    private static GenericDialog open(String command, String title) throws Exception {
        ImageJHarness.allowDialog(title);
        IJ.doCommand(command);
        long end = System.currentTimeMillis() + 20_000;
        while (System.currentTimeMillis() < end) {
            for (java.awt.Window w : java.awt.Window.getWindows()) {
                if (w instanceof GenericDialog g && g.isShowing() && title.equals(g.getTitle())) {
                    Thread.sleep(300);
                    return g;
                }
            }
            Thread.sleep(50);
        }
        throw new AssertionError("no dialog " + title + "; closed: " + ImageJHarness.closedDialogs());
    }

    private static void press(GenericDialog gd, int button) throws Exception {
        EventQueue.invokeAndWait(() -> {
            Button b = gd.getButtons()[button];
            gd.actionPerformed(new ActionEvent(b, ActionEvent.ACTION_PERFORMED, b.getLabel()));
        });
    }

    private static String text(Component c) {
        if (c instanceof Choice ch) {
            return ch.getSelectedItem();
        }
        if (c instanceof Checkbox cb) {
            return Boolean.toString(cb.getState());
        }
        return ((TextField) c).getText();
    }

    private static ImagePlus waitForImage(String title) throws InterruptedException {
        long end = System.currentTimeMillis() + 60_000;
        while (System.currentTimeMillis() < end) {
            ImagePlus imp = WindowManager.getImage(title);
            if (imp != null) {
                return imp;
            }
            Thread.sleep(100);
        }
        throw new AssertionError("no image " + title + "; closed dialogs: " + ImageJHarness.closedDialogs());
    }

    @Test
    void aFirstDeconvolutionThenItsResidualView() throws Exception {
        Operation deconvolve = Operations.byName("deconvolve").orElseThrow();
        WindowManager.getImage("simulate").getWindow().toFront();
        IJ.selectWindow("simulate");

        // the PSF starts on the image that looks like one; the RGB picture is not offered
        GenericDialog gd = open("Deconvolve Stack...", "Stackwright deconvolve");
        Map<String, Component> f = fields(gd, deconvolve);
        assertEquals("simulate", text(f.get("input")));
        assertEquals("simulate-psf-output", text(f.get("psf")));
        Choice input = (Choice) f.get("input");
        for (int i = 0; i < input.getItemCount(); i++) {
            assertFalse(input.getItem(i).equals("picture"), "an RGB picture is offered");
        }
        assertFalse(f.get("regularization").isEnabled(), "regularization is greyed out for richardson-lucy");
        EventQueue.invokeAndWait(() -> {
            ((TextField) f.get("offset")).setText("100");
            ((TextField) f.get("read-noise")).setText("2");
            ((TextField) f.get("iterations")).setText("3");
        });
        press(gd, 0);
        ImagePlus result = waitForImage("simulate-deconvolve");
        ImageJHarness.allowDialog(null);
        assertEquals(List.of(), ImageJHarness.closedDialogs());

        // the dialog remembers what was confirmed in it
        gd = open("Deconvolve Stack...", "Stackwright deconvolve");
        Map<String, Component> again = fields(gd, deconvolve);
        assertEquals("100", text(again.get("offset")));
        assertEquals("2", text(again.get("read-noise")));
        assertEquals("3", text(again.get("iterations")));
        press(gd, 1);

        // the residual view starts on the deconvolution's data, result, PSF and camera values
        Operation residuals = Operations.byName("residuals").orElseThrow();
        result.getWindow().toFront();
        gd = open("Residual View...", "Stackwright residuals");
        Map<String, Component> r = fields(gd, residuals);
        assertEquals("simulate", text(r.get("input")));
        assertEquals("simulate-deconvolve", text(r.get("estimate")));
        assertEquals("simulate-psf-output", text(r.get("psf")));
        assertEquals("100", text(r.get("offset")));
        assertEquals("2", text(r.get("read-noise")));
        assertEquals("poisson-gaussian", text(r.get("likelihood")));
        ResultsTable runs = ResultsTable.getResultsTable(RunReport.TABLE);
        int row = runs.size() - 1;
        double used = runs.getValue("background_used", row);
        assertEquals(used, Double.parseDouble(text(r.get("background"))), 1e-9 * Math.abs(used),
                "the background the deconvolution used (auto)");
        press(gd, 1);
        ImageJHarness.allowDialog(null);

        // in a macro the recorded line rules: what it leaves out takes the default, not the remembered value
        String err = ImageJHarness.runMacro("run('Residual View...', 'input=simulate estimate=simulate-deconvolve "
                + "psf=simulate-psf-output');", "");
        assertNull(err, err);
        runs = ResultsTable.getResultsTable(RunReport.TABLE);
        assertEquals(0.0, runs.getValue("offset", runs.size() - 1), "macro: offset defaults to 0");
    }

    @Test
    void checkboxOutputsAreMadeAndTheTableLeavesOtherSettingsEmpty() throws Exception {
        String err = ImageJHarness.runMacro(""
                + "run('Residual View...', 'input=simulate estimate=simulate-truth psf=simulate-psf-output offset=100 "
                + "background=10 likelihood=poisson-gaussian read-noise=2 summary');"
                + "run('Simulate Specimen...', 'size=64x64x1 grid=2x2 seam-width=2 seed=7');"
                + "rename('tiles');"
                + "run('Tile Seam Mask...', 'input=tiles grid=2x2 tile=32x32 level offset=100 levelled-output');"
                + "run('Model PSF...', 'model=gaussian na=1 wavelength=520 immersion-index=1.33 pixel=0.1 step=0.25 "
                + "size=5x5x5');"
                + "Table.save('" + dir.resolve("runs.csv") + "', '" + RunReport.TABLE + "');", "");
        assertNull(err, err);
        assertNotNull(WindowManager.getImage("simulate-residuals-summary"), "residual summary ticked and made");
        assertNotNull(WindowManager.getImage("tiles-seam-mask-levelled-output"), "levelled image ticked and made");
        assertNotNull(WindowManager.getImage("psf-gaussian-NA1-520nm"), "a modelled PSF says what it is");
        List<String> csv = Files.readAllLines(dir.resolve("runs.csv"));
        List<String> head = Arrays.asList(csv.get(0).split(",", -1));
        String[] psfRow = csv.get(csv.size() - 1).split(",", -1);
        assertEquals("psf", psfRow[head.indexOf("operation")]);
        // ImageJ writes an empty text cell as "" in a CSV file
        assertEquals("", psfRow[head.indexOf("offset")].replace("\"", ""), "a psf run has no offset: empty, not 0");
        assertEquals("", psfRow[head.indexOf("seam-width")].replace("\"", ""), "nor a seam width");
    }
}
