package org.stackwright.imagej;

import java.util.Collection;
import java.util.List;
import java.util.function.Consumer;

import ij.ImagePlus;
import ij.ImageStack;
import ij.measure.Calibration;

import org.stackwright.volume.ImagePlusAdapter;

/** Splitting a hyperstack into single (channel, time point) stacks and putting results back together. */
final class Hyperstacks {

    private Hyperstacks() {
    }

    /**
     * @return a copy of the z-stack at (channel, frame), with the image's title and calibration; the image is not
     *     modified
     */
    static ImagePlus part(ImagePlus imp, int channel, int frame) {
        int nz = imp.getNSlices();
        ImageStack in = imp.getStack();
        ImageStack st = new ImageStack(imp.getWidth(), imp.getHeight());
        for (int z = 1; z <= nz; z++) {
            st.addSlice(in.getProcessor(imp.getStackIndex(channel, z, frame)).duplicate());
        }
        ImagePlus out = new ImagePlus(imp.getTitle(), st);
        out.setDimensions(1, nz, 1);
        out.setCalibration(imp.getCalibration().copy());
        String[] props = imp.getPropertiesAsArray();
        if (props != null) {
            out.setProperties(props); // notes about the file, e.g. a z step it did not record
        }
        return out;
    }

    /**
     * Puts one output per (channel, time point) together, time points outer, channels inner.
     *
     * @param parts one image per part, in run order; an entry may be null when that part made no such image
     * @param input the main input (for its calibration), or null
     * @param inputs every input image of the run (compared by identity)
     * @return the image, or null when no part made it or the parts do not fit together (then a warning says why)
     */
    static ImagePlus assemble(List<ImagePlus> parts, int nc, int nt, ImagePlus input, Collection<ImagePlus> inputs,
            String title, Consumer<String> warnings) {
        ImagePlus first = parts.get(0);
        if (parts.size() == 1) {
            if (first == null) {
                return null;
            }
            // an operation that hands back one of its inputs must not rename the user's window
            boolean given = inputs.stream().anyMatch(i -> i == first);
            ImagePlus out = given ? first.duplicate() : first;
            out.setTitle(title);
            carryCalibration(out, first, input);
            return out;
        }
        for (ImagePlus p : parts) {
            if (p == null || first == null || p.getWidth() != first.getWidth() || p.getHeight() != first.getHeight()
                    || p.getStackSize() != first.getStackSize() || p.getBitDepth() != first.getBitDepth()) {
                warnings.accept(title + " not made: the channels or time points gave images of different shapes");
                return null;
            }
        }
        int nz = first.getStackSize();
        ImageStack st = new ImageStack(first.getWidth(), first.getHeight());
        for (int t = 0; t < nt; t++) {
            for (int z = 1; z <= nz; z++) {
                for (int c = 0; c < nc; c++) {
                    st.addSlice(parts.get(t * nc + c).getStack().getProcessor(z).duplicate());
                }
            }
        }
        ImagePlus out = new ImagePlus(title, st);
        out.setDimensions(nc, nz, nt);
        carryCalibration(out, first, input);
        if (nc > 1 || nt > 1) {
            out = new ij.CompositeImage(out, ij.CompositeImage.COLOR);
            out.setTitle(title);
            out.setOpenAsHyperStack(true);
        }
        return out;
    }

    /**
     * The input's calibration when the operation kept the voxel size (so its unit, origin and time interval are
     * carried over), else the operation's own.
     */
    private static void carryCalibration(ImagePlus out, ImagePlus made, ImagePlus input) {
        Calibration cal = made.getCalibration().copy();
        if (input != null) {
            Calibration in = input.getCalibration();
            boolean sameVoxel = ImagePlusAdapter.voxelSize(made).sameAs(ImagePlusAdapter.voxelSize(input))
                    && ImagePlusAdapter.isCalibrated(made) == ImagePlusAdapter.isCalibrated(input);
            if (sameVoxel) {
                cal = in.copy();
                cal.disableDensityCalibration();
            } else {
                cal.frameInterval = in.frameInterval;
                cal.setTimeUnit(in.getTimeUnit());
            }
        }
        out.setCalibration(cal);
    }
}
