package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code camera-noise} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Camera Noise")
public final class CameraNoiseCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "dark")
    private ImagePlus dark;

    @Parameter(persist = false, required = false, label = "flat")
    private ImagePlus flat;

    @Parameter(persist = false, required = false, label = "offset")
    private Double offset;

    @Parameter(persist = false, required = false, label = "mask")
    private ImagePlus mask;

    @Parameter(type = ItemIO.OUTPUT, label = "plot")
    private ImagePlus plot;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public CameraNoiseCommand() {
        super("camera-noise");
    }
}
