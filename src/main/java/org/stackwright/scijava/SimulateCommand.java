package org.stackwright.scijava;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code simulate} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Simulate Specimen")
public final class SimulateCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "specimen")
    private String specimen;

    @Parameter(persist = false, required = false, label = "size")
    private String size;

    @Parameter(persist = false, required = false, label = "pixel")
    private Double pixel;

    @Parameter(persist = false, required = false, label = "step")
    private Double step;

    @Parameter(persist = false, required = false, label = "na")
    private Double na;

    @Parameter(persist = false, required = false, label = "wavelength")
    private Double wavelength;

    @Parameter(persist = false, required = false, label = "immersion-index")
    private Double immersionIndex;

    @Parameter(persist = false, required = false, label = "brightness")
    private Double brightness;

    @Parameter(persist = false, required = false, label = "beads")
    private Integer beads;

    @Parameter(persist = false, required = false, label = "background")
    private Double background;

    @Parameter(persist = false, required = false, label = "gain")
    private Double gain;

    @Parameter(persist = false, required = false, label = "offset")
    private Double offset;

    @Parameter(persist = false, required = false, label = "read-noise")
    private Double readNoise;

    @Parameter(persist = false, required = false, label = "defects")
    private Integer defects;

    @Parameter(persist = false, required = false, label = "grid")
    private String grid;

    @Parameter(persist = false, required = false, label = "seam-width")
    private Integer seamWidth;

    @Parameter(persist = false, required = false, label = "seed")
    private Integer seed;

    @Parameter(persist = false, required = false, label = "bits")
    private String bits;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(type = ItemIO.OUTPUT, label = "truth")
    private ImagePlus truth;

    @Parameter(type = ItemIO.OUTPUT, label = "psf-output")
    private ImagePlus psfOutput;

    @Parameter(type = ItemIO.OUTPUT, label = "mask-output")
    private ImagePlus maskOutput;

    public SimulateCommand() {
        super("simulate");
    }
}
