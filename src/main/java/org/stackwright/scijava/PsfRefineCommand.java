package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code psf-refine} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Refine PSF Optics")
public final class PsfRefineCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "source")
    private String source;

    @Parameter(persist = false, required = false, label = "model")
    private String model;

    @Parameter(persist = false, required = false, label = "na")
    private Double na;

    @Parameter(persist = false, required = false, label = "wavelength")
    private Double wavelength;

    @Parameter(persist = false, required = false, label = "immersion-index")
    private Double immersionIndex;

    @Parameter(persist = false, required = false, label = "sample-index")
    private Double sampleIndex;

    @Parameter(persist = false, required = false, label = "coverslip-index")
    private Double coverslipIndex;

    @Parameter(persist = false, required = false, label = "coverslip-thickness")
    private Double coverslipThickness;

    @Parameter(persist = false, required = false, label = "coverslip-design-thickness")
    private Double coverslipDesignThickness;

    @Parameter(persist = false, required = false, label = "depth")
    private Double depth;

    @Parameter(persist = false, required = false, label = "fit")
    private String fit;

    @Parameter(persist = false, required = false, label = "deepest")
    private Double deepest;

    @Parameter(persist = false, required = false, label = "pixel")
    private Double pixel;

    @Parameter(persist = false, required = false, label = "step")
    private Double step;

    @Parameter(persist = false, required = false, label = "size")
    private String size;

    @Parameter(persist = false, required = false, label = "offset")
    private Double offset;

    @Parameter(persist = false, required = false, label = "gain")
    private Double gain;

    @Parameter(persist = false, required = false, label = "read-noise")
    private Double readNoise;

    @Parameter(persist = false, required = false, label = "iterations")
    private Integer iterations;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public PsfRefineCommand() {
        super("psf-refine");
    }
}
