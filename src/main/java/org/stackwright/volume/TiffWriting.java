package org.stackwright.volume;

import java.io.IOException;
import java.io.OutputStream;

import ij.ImagePlus;
import ij.gui.Plot;
import ij.io.FileInfo;
import ij.io.FileSaver;
import ij.io.RoiEncoder;
import ij.io.TiffEncoder;

/**
 * Encodes an ImageJ image as TIFF into a stream the caller controls, with exactly the metadata ImageJ's own
 * {@code FileSaver.saveAsTiff}/{@code saveAsTiffStack} write (description with calibration and hyperstack
 * dimensions, slice labels, the data of a plot, ROI, overlay, properties, display ranges and LUTs of composites): the bytes are the
 * same, but a write error reaches the caller as an {@link IOException} instead of an ImageJ dialog or message.
 */
final class TiffWriting {

    private TiffWriting() {
    }

    /**
     * @param imp the image (not modified)
     * @param out where the TIFF goes (not closed)
     * @throws IOException when the stream fails
     */
    static void encode(ImagePlus imp, OutputStream out) throws IOException {
        FileSaver saver = new FileSaver(imp);
        FileInfo fi = imp.getFileInfo();
        fi.info = imp.getInfoProperty();
        fi.description = saver.getDescriptionString();
        if (fi.nImages > 1) {
            fi.sliceLabels = imp.getStack().getSliceLabels();
        } else {
            String label = imp.hasImageStack() ? imp.getStack().getSliceLabel(1) : null;
            fi.sliceLabels = label == null ? null : new String[] {label};
        }
        if (fi.nImages == 1 && imp.getProperty(Plot.PROPERTY_KEY) instanceof Plot plot) {
            fi.plot = plot.toByteArray(); // a plot keeps its data, so ImageJ reopens it as a live plot
        }
        fi.roi = RoiEncoder.saveAsByteArray(imp.getRoi());
        fi.overlay = FileSaver.getOverlay(imp);
        fi.properties = imp.getPropertiesAsArray();
        if (imp.getStack().isVirtual()) {
            fi.virtualStack = (ij.VirtualStack) imp.getStack();
        }
        if (imp.isComposite() && fi.nImages > 1) {
            saver.saveDisplayRangesAndLuts(imp, fi);
        }
        new TiffEncoder(fi).write(out);
    }
}
