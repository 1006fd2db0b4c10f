package org.stackwright.inspect;

import java.awt.Color;
import java.awt.Font;
import java.util.List;

import ij.ImagePlus;
import ij.process.ColorProcessor;
import ij.process.FloatProcessor;
import ij.process.ImageProcessor;

import org.stackwright.volume.Volume;

/** Pictures for people: maximum projections placed side by side with captions, as an RGB image (save as PNG). */
public final class Pictures {

    private Pictures() {
    }

    /** @return the maximum-intensity projection along z, as a one-plane volume */
    public static Volume maxProjection(Volume v) {
        int w = v.width();
        int h = v.height();
        float[] out = new float[w * h];
        java.util.Arrays.fill(out, Float.NEGATIVE_INFINITY);
        float[] d = v.data();
        for (int z = 0; z < v.depth(); z++) {
            int off = z * w * h;
            for (int i = 0; i < w * h; i++) {
                out[i] = Math.max(out[i], d[off + i]);
            }
        }
        return new Volume(w, h, 1, out, v.voxel());
    }

    /**
     * Places the maximum projections of the volumes side by side, each scaled from its own 0.1 to 99.9 percentile
     * to grey, with its caption above it.
     *
     * @param volumes volumes of the same width and height
     * @param captions one caption per volume
     * @param title title of the returned image
     */
    public static ImagePlus sideBySide(List<Volume> volumes, List<String> captions, String title) {
        int gap = 8;
        int top = 22;
        int w = volumes.get(0).width();
        int h = volumes.get(0).height();
        int scale = Math.max(1, 256 / Math.max(w, h));
        int tw = w * scale;
        int th = h * scale;
        ColorProcessor cp = new ColorProcessor(volumes.size() * (tw + gap) + gap, th + top + gap);
        cp.setColor(Color.BLACK);
        cp.fill();
        cp.setFont(new Font("SansSerif", Font.PLAIN, 13));
        cp.setAntialiasedText(true);
        for (int i = 0; i < volumes.size(); i++) {
            Volume mip = maxProjection(volumes.get(i));
            FloatProcessor fp = new FloatProcessor(w, h, mip.data().clone());
            double[] range = percentiles(mip.data(), 0.001, 0.999);
            fp.setMinAndMax(range[0], range[1]);
            ImageProcessor gray = fp.convertToByteProcessor(true);
            if (scale > 1) {
                gray.setInterpolationMethod(ImageProcessor.NONE);
                gray = gray.resize(tw, th);
            }
            int x0 = gap + i * (tw + gap);
            cp.insert(gray.convertToColorProcessor(), x0, top);
            cp.setColor(Color.WHITE);
            cp.drawString(captions.get(i), x0, top - 4);
        }
        return new ImagePlus(title, cp);
    }

    /** @return the lo and hi quantiles of the values (sorted copy) */
    public static double[] percentiles(float[] values, double lo, double hi) {
        float[] s = values.clone();
        java.util.Arrays.sort(s);
        double a = s[(int) Math.floor(lo * (s.length - 1))];
        double b = s[(int) Math.ceil(hi * (s.length - 1))];
        if (b <= a) {
            b = a + 1;
        }
        return new double[] {a, b};
    }
}
