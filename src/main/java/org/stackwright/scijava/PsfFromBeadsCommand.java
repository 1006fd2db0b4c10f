package org.stackwright.scijava;

import java.io.File;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.Command;
import org.scijava.plugin.Parameter;
import org.scijava.plugin.Plugin;

/**
 * SciJava command for the {@code psf-from-beads} operation: one field per setting, named after its key (see
 * {@link OperationCommand}); a null field keeps the default.
 */
@Plugin(type = Command.class, headless = true, label = "PSF from Beads")
public final class PsfFromBeadsCommand extends OperationCommand {

    @Parameter(persist = false, required = false, label = "input")
    private ImagePlus input;

    @Parameter(persist = false, required = false, label = "size")
    private String size;

    @Parameter(persist = false, required = false, label = "bead-diameter")
    private Double beadDiameter;

    @Parameter(persist = false, required = false, label = "saturation")
    private Double saturation;

    @Parameter(persist = false, required = false, label = "na")
    private Double na;

    @Parameter(persist = false, required = false, label = "wavelength")
    private Double wavelength;

    @Parameter(persist = false, required = false, label = "immersion-index")
    private Double immersionIndex;

    @Parameter(type = ItemIO.OUTPUT, label = "output")
    private ImagePlus output;

    @Parameter(persist = false, required = false, label = "record")
    private File record;

    public PsfFromBeadsCommand() {
        super("psf-from-beads");
    }
}
