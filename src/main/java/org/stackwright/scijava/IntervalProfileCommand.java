package org.stackwright.scijava;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code interval-profile} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Credible Interval Profile")
public final class IntervalProfileCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "mean")
    private ImagePlus mean;

    @Parameter(persist = false, required = false, label = "lower")
    private ImagePlus lower;

    @Parameter(persist = false, required = false, label = "upper")
    private ImagePlus upper;

    @Parameter(persist = false, required = false, label = "line")
    private String line;

    @Parameter(persist = false, required = false, label = "plane")
    private Integer plane;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    public IntervalProfileCommand() {
        super("interval-profile");
    }
}
