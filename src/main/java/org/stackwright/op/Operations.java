package org.stackwright.op;

import java.util.List;
import java.util.Optional;

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
                new DeconvolveOperation());
    }

    /** @return the operation with this command-line name */
    public static Optional<Operation> byName(String name) {
        return all().stream().filter(o -> o.name().equals(name)).findFirst();
    }
}
