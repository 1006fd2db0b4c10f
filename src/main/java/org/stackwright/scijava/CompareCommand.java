package org.stackwright.scijava;

import ij.ImagePlus;

import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code compare} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Compare with Reference")
public final class CompareCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "reference")
    private ImagePlus reference;

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "data-range")
    private Double dataRange;

    public CompareCommand() {
        super("compare");
    }
}
