package org.stackwright.imagej;

import java.util.ArrayList;
import java.util.List;
import java.util.Locale;

import ij.ImagePlus;
import ij.ImageStack;
import ij.WindowManager;

/**
 * The images a dialog offers and which one each image field starts on.
 *
 * <p>Offered: every open image except RGB colour images (plots, pictures: no operation reads them). Defaults, in
 * the dialog (a macro names its images): a follow-up of the previous run first (after a deconvolution the residual
 * view starts on its data, its result and its PSF); then the main input is the current image; a PSF field starts
 * on the newest open image that looks like a PSF (odd sizes, no larger than the input, brightest near the centre
 * voxel), else on the entry "{@value #CHOOSE_PSF}", which must be changed (on "none" where the PSF is optional, as
 * when deconvolve can model it from the optics); another required image on one whose
 * title contains the key, else the first other image; an optional image on "none".
 */
final class ImageChoices {

    /** The entry a PSF field starts on when no open image looks like a PSF. */
    static final String CHOOSE_PSF = "(choose the PSF)";

    /** Images larger than this are not scanned for a peak when looking for a PSF. */
    private static final long PEAK_SCAN_VOXELS = 8_000_000L;

    private ImageChoices() {
    }

    /** @return the titles of the open images an operation can read, newest last */
    static List<String> titles() {
        List<String> out = new ArrayList<>();
        int[] ids = WindowManager.getIDList();
        if (ids == null) {
            return out;
        }
        for (int id : ids) {
            ImagePlus imp = WindowManager.getImage(id);
            if (imp != null && imp.getType() != ImagePlus.COLOR_RGB) {
                out.add(imp.getTitle());
            }
        }
        return out;
    }

    /**
     * @param key the image field
     * @param items the entries offered, in order
     * @param current the current image, or null
     * @param main true for the operation's main input
     * @param suggested the follow-up or remembered title for this field, or null
     * @param input the title already chosen as main input, or null
     * @return the entry the field starts on
     */
    static String initial(String key, boolean required, List<String> items, ImagePlus current, boolean main,
            String suggested, String input) {
        if (suggested != null && items.contains(suggested)
                && (!key.equals("psf") || looksLikePsf(WindowManager.getImage(suggested), image(input)))) {
            return suggested;
        }
        if (main && current != null && items.contains(current.getTitle())) {
            return current.getTitle();
        }
        if (key.equals("psf")) {
            String psf = newestPsf(items, input);
            if (psf != null) {
                return psf;
            }
            if (required) {
                return items.contains(CHOOSE_PSF) ? CHOOSE_PSF : items.get(0);
            }
        }
        if (!required) {
            return OperationDialog.NONE;
        }
        for (String t : items) {
            if (t.toLowerCase(Locale.ROOT).contains(key) && !t.equals(input)) {
                return t;
            }
        }
        for (String t : items) {
            if (!t.equals(input) && !t.equals(CHOOSE_PSF)) {
                return t;
            }
        }
        return items.get(0);
    }

    private static ImagePlus image(String title) {
        return title == null ? null : WindowManager.getImage(title);
    }

    /** @return the newest offered image that looks like a PSF for the input, or null */
    static String newestPsf(List<String> items, String input) {
        ImagePlus in = image(input);
        for (int i = items.size() - 1; i >= 0; i--) {
            String t = items.get(i);
            if (!t.equals(input) && looksLikePsf(WindowManager.getImage(t), in)) {
                return t;
            }
        }
        return null;
    }

    /**
     * @param input the image the PSF is for, or null
     * @return true for a one-channel image with odd sizes, no larger than the input, whose brightest voxel lies
     *     within one voxel of the centre voxel
     */
    static boolean looksLikePsf(ImagePlus imp, ImagePlus input) {
        if (imp == null || imp.getType() == ImagePlus.COLOR_RGB || imp.getNChannels() != 1 || imp.getNFrames() != 1) {
            return false;
        }
        int w = imp.getWidth();
        int h = imp.getHeight();
        int d = imp.getNSlices();
        if (w % 2 == 0 || h % 2 == 0 || d % 2 == 0 || (long) w * h * d > PEAK_SCAN_VOXELS) {
            return false;
        }
        if (input != null && input != imp && (w > input.getWidth() || h > input.getHeight()
                || d > input.getNSlices())) {
            return false;
        }
        ImageStack st = imp.getStack();
        double best = Double.NEGATIVE_INFINITY;
        int bx = 0;
        int by = 0;
        int bz = 0;
        for (int z = 0; z < d; z++) {
            float[] px = (float[]) st.getProcessor(z + 1).convertToFloatProcessor().getPixels();
            for (int i = 0; i < px.length; i++) {
                if (px[i] > best) {
                    best = px[i];
                    bx = i % w;
                    by = i / w;
                    bz = z;
                }
            }
        }
        return Math.abs(bx - w / 2) <= 1 && Math.abs(by - h / 2) <= 1 && Math.abs(bz - d / 2) <= 1;
    }
}
