package org.stackwright.registry;

import java.util.List;
import java.util.Optional;

import org.stackwright.op.Operation;

import org.stackwright.inspect.CameraNoiseOperation;
import org.stackwright.inspect.CompareOperation;
import org.stackwright.inspect.IntervalProfileOperation;
import org.stackwright.inspect.ResidualsOperation;
import org.stackwright.repair.FindDefectsOperation;
import org.stackwright.repair.InpaintOperation;
import org.stackwright.repair.SeamMaskOperation;
import org.stackwright.psf.MeasurePsfOperation;
import org.stackwright.psf.PsfFromBeadsOperation;
import org.stackwright.psf.PsfOperation;
import org.stackwright.refine.PsfRefineOperation;
import org.stackwright.simulate.SimulateOperation;
import org.stackwright.solve.DeconvolveOperation;

/**
 * The list of all operations: the one place a new operation is registered. Every door (command line, ImageJ
 * plugins, SciJava commands) reads this list.
 */
public final class Operations {

    private Operations() {
    }

    /** @return every operation, in the order help lists them */
    public static List<Operation> all() {
        return List.of(
                new SimulateOperation(),
                new PsfOperation(),
                new PsfFromBeadsOperation(),
                new MeasurePsfOperation(),
                new PsfRefineOperation(),
                new FindDefectsOperation(),
                new SeamMaskOperation(),
                new InpaintOperation(),
                new ResidualsOperation(),
                new CompareOperation(),
                new CameraNoiseOperation(),
                new IntervalProfileOperation(),
                new DeconvolveOperation());
    }

    /** @return the operation with this command-line name */
    public static Optional<Operation> byName(String name) {
        return all().stream().filter(o -> o.name().equals(name)).findFirst();
    }
}
