package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code psf} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "Model PSF")
public final class PsfCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "model")
    private String model;

    @Parameter(persist = false, required = false, label = "na")
    private Double na;

    @Parameter(persist = false, required = false, label = "wavelength")
    private Double wavelength;

    @Parameter(persist = false, required = false, label = "excitation")
    private Double excitation;

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

    @Parameter(persist = false, required = false, label = "pinhole")
    private Double pinhole;

    @Parameter(persist = false, required = false, label = "pixel")
    private Double pixel;

    @Parameter(persist = false, required = false, label = "step")
    private Double step;

    @Parameter(persist = false, required = false, label = "size")
    private String size;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public PsfCommand() {
        super("psf");
    }
}
