package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code residuals} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Residual View")
public final class ResidualsCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "estimate")
    private ImagePlus estimate;

    @Parameter(persist = false, required = false, label = "psf")
    private ImagePlus psf;

    @Parameter(persist = false, required = false, label = "offset")
    private Double offset;

    @Parameter(persist = false, required = false, label = "background")
    private Double background;

    @Parameter(persist = false, required = false, label = "likelihood")
    private String likelihood;

    @Parameter(persist = false, required = false, label = "gain")
    private Double gain;

    @Parameter(persist = false, required = false, label = "read-noise")
    private Double readNoise;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(type = ItemIO.OUTPUT, label = "summary")
    private ImagePlus summary;

    @Parameter(persist = false, required = false, label = "fft")
    private String fft;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public ResidualsCommand() {
        super("residuals");
    }
}
