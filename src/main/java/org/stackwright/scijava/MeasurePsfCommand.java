package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code measure-psf} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Measure PSF Width")
public final class MeasurePsfCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public MeasurePsfCommand() {
        super("measure-psf");
    }
}
