package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.plugin.Parameter;
import org.stackwright.imagej.OffsetOperation;
import org.stackwright.op.Operation;

/** The SciJava door of the test-only operation (not indexed: tests run it through its CommandInfo). */
public final class OffsetCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "psf")
    private ImagePlus psf;

    @Parameter(persist = false, required = false, label = "wavelength")
    private Double wavelength;

    @Parameter(persist = false, required = false, label = "method")
    private String method;

    @Parameter(persist = false, required = false, label = "verbose")
    private Boolean verbose;

    @Parameter(persist = false, required = false, label = "iterations")
    private Integer iterations;

    @Parameter(persist = false, required = false, label = "cancel-at")
    private Integer cancelAt;

    @Parameter(persist = false, required = false, label = "note")
    private String note;

    @Parameter(persist = false, required = false, label = "read-noise")
    private Double readNoise;

    @Parameter(persist = false, required = false, label = "noise")
    private String noise;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(type = ItemIO.OUTPUT, label = "extra")
    private ImagePlus extra;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public OffsetCommand() {
        super("test-offset");
    }

    @Override
    protected Operation lookup(String name) {
        return name.equals("test-offset") ? new OffsetOperation() : super.lookup(name);
    }
}
