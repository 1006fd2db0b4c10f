package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code deconvolve} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Deconvolve Stack")
public final class DeconvolveCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "psf")
    private ImagePlus psf;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(persist = false, required = false, label = "method")
    private String method;

    @Parameter(persist = false, required = false, label = "iterations")
    private Integer iterations;

    @Parameter(persist = false, required = false, label = "stop")
    private String stop;

    @Parameter(persist = false, required = false, label = "tolerance")
    private Double tolerance;

    @Parameter(persist = false, required = false, label = "offset")
    private Double offset;

    @Parameter(persist = false, required = false, label = "background")
    private String background;

    @Parameter(persist = false, required = false, label = "gain")
    private String gain;

    @Parameter(persist = false, required = false, label = "read-noise")
    private String readNoise;

    @Parameter(persist = false, required = false, label = "dark")
    private ImagePlus dark;

    @Parameter(persist = false, required = false, label = "flat")
    private ImagePlus flat;

    @Parameter(persist = false, required = false, label = "regularization")
    private String regularization;

    @Parameter(persist = false, required = false, label = "mask")
    private ImagePlus mask;

    @Parameter(persist = false, required = false, label = "boundary")
    private String boundary;

    @Parameter(persist = false, required = false, label = "acceleration")
    private String acceleration;

    @Parameter(persist = false, required = false, label = "likelihood")
    private String likelihood;

    @Parameter(persist = false, required = false, label = "uncertainty")
    private String uncertainty;

    @Parameter(persist = false, required = false, label = "replicas")
    private Integer replicas;

    @Parameter(persist = false, required = false, label = "samples")
    private Integer samples;

    @Parameter(persist = false, required = false, label = "level")
    private Double level;

    @Parameter(persist = false, required = false, label = "chains")
    private Integer chains;

    @Parameter(persist = false, required = false, label = "burn-in")
    private Integer burnIn;

    @Parameter(persist = false, required = false, label = "thinning")
    private Integer thinning;

    @Parameter(type = ItemIO.OUTPUT, label = "spread-output")
    private ImagePlus spreadOutput;

    @Parameter(type = ItemIO.OUTPUT, label = "bias-output")
    private ImagePlus biasOutput;

    @Parameter(type = ItemIO.OUTPUT, label = "lower-output")
    private ImagePlus lowerOutput;

    @Parameter(type = ItemIO.OUTPUT, label = "upper-output")
    private ImagePlus upperOutput;

    @Parameter(type = ItemIO.OUTPUT, label = "width-output")
    private ImagePlus widthOutput;

    @Parameter(persist = false, required = false, label = "na")
    private Double na;

    @Parameter(persist = false, required = false, label = "wavelength")
    private Double wavelength;

    @Parameter(persist = false, required = false, label = "immersion-index")
    private Double immersionIndex;

    @Parameter(persist = false, required = false, label = "depth-variant")
    private String depthVariant;

    @Parameter(persist = false, required = false, label = "strata")
    private Integer strata;

    @Parameter(persist = false, required = false, label = "sample-index")
    private Double sampleIndex;

    @Parameter(persist = false, required = false, label = "first-depth")
    private Double firstDepth;

    @Parameter(persist = false, required = false, label = "fft")
    private String fft;

    @Parameter(persist = false, required = false, label = "block-size")
    private String blockSize;

    @Parameter(persist = false, required = false, label = "memory")
    private String memory;

    @Parameter(type = ItemIO.OUTPUT, label = "residuals")
    private ImagePlus residuals;

    @Parameter(type = ItemIO.OUTPUT, label = "residuals-summary")
    private ImagePlus residualsSummary;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public DeconvolveCommand() {
        super("deconvolve");
    }
}
