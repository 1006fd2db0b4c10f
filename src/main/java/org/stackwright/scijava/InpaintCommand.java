package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code inpaint} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Fill Masked Pixels")
public final class InpaintCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "mask")
    private ImagePlus mask;

    @Parameter(persist = false, required = false, label = "method")
    private String method;

    @Parameter(persist = false, required = false, label = "mode")
    private String mode;

    @Parameter(persist = false, required = false, label = "iterations")
    private Integer iterations;

    @Parameter(persist = false, required = false, label = "tolerance")
    private Double tolerance;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(type = ItemIO.OUTPUT, label = "filled-output")
    private ImagePlus filledOutput;

    @Parameter(persist = false, required = false, label = "block-size")
    private String blockSize;

    @Parameter(persist = false, required = false, label = "memory")
    private String memory;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public InpaintCommand() {
        super("inpaint");
    }
}
