package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code find-defects} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Find Defective Pixels")
public final class FindDefectsCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "dark")
    private ImagePlus dark;

    @Parameter(persist = false, required = false, label = "flat")
    private ImagePlus flat;

    @Parameter(persist = false, required = false, label = "threshold")
    private Double threshold;

    @Parameter(persist = false, required = false, label = "fraction")
    private Double fraction;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(persist = false, required = false, label = "block-size")
    private String blockSize;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public FindDefectsCommand() {
        super("find-defects");
    }
}
