package org.stackwright.imagej;

import ij.ImagePlus;
import ij.ImageStack;
import ij.measure.Calibration;
import ij.process.FloatProcessor;

/** Test images for the door tests (usable without a display). */
public final class ImageJDoorTestData {

    private ImageJDoorTestData() {
    }

    /** A float hyperstack with distinct values, calibrated 0.09 x 0.09 x 0.3 um, 2.5 s per frame. */
    public static ImagePlus hyperstack(String title, int nc, int nz, int nt) {
        int w = 8;
        int h = 6;
        ImageStack st = new ImageStack(w, h);
        for (int i = 0; i < nc * nz * nt; i++) {
            float[] px = new float[w * h];
            for (int k = 0; k < px.length; k++) {
                px[k] = (i * 31 + k * 7) % 97;
            }
            st.addSlice(new FloatProcessor(w, h, px));
        }
        ImagePlus imp = new ImagePlus(title, st);
        imp.setDimensions(nc, nz, nt);
        imp.setOpenAsHyperStack(true);
        Calibration cal = new Calibration();
        cal.setUnit("micron");
        cal.pixelWidth = 0.09;
        cal.pixelHeight = 0.09;
        cal.pixelDepth = 0.3;
        cal.frameInterval = 2.5;
        cal.setTimeUnit("s");
        imp.setCalibration(cal);
        return imp;
    }

}
