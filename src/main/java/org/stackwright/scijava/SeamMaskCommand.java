package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code seam-mask} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Tile Seam Mask")
public final class SeamMaskCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "grid")
    private String grid;

    @Parameter(persist = false, required = false, label = "tile")
    private String tile;

    @Parameter(persist = false, required = false, label = "overlap")
    private String overlap;

    @Parameter(persist = false, required = false, label = "order")
    private String order;

    @Parameter(persist = false, required = false, label = "seam-width")
    private Integer seamWidth;

    @Parameter(persist = false, required = false, label = "detect")
    private Boolean detect;

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "threshold")
    private Double threshold;

    @Parameter(persist = false, required = false, label = "level")
    private Boolean level;

    @Parameter(persist = false, required = false, label = "level-tiles")
    private Boolean levelTiles;

    @Parameter(persist = false, required = false, label = "offset")
    private Double offset;

    @Parameter(persist = false, required = false, label = "strip")
    private Integer strip;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(type = ItemIO.OUTPUT, label = "levelled-output")
    private ImagePlus levelledOutput;

    @Parameter(type = ItemIO.OUTPUT, label = "flat-field")
    private ImagePlus flatField;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public SeamMaskCommand() {
        super("seam-mask");
    }
}
