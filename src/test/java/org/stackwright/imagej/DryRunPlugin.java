package org.stackwright.imagej;

import org.stackwright.op.Operation;

/**
 * The real ImageJ door of an operation (dialog, macro options, recording) without running it: the settings a
 * person confirmed are kept for the test instead. Registered by {@link ImageJHarness} as
 * "Dry Run OPERATION..." for every operation, so that a test can press OK with the Macro Recorder on.
 */
public class DryRunPlugin extends OperationPlugin {

    /** What the last dry run was given, or null. */
    static volatile DoorSettings last;

    @Override
    protected Operation lookup(String name) {
        return name.equals("test-offset") ? new OffsetOperation() : super.lookup(name);
    }

    @Override
    void execute(Operation op, DoorSettings s) {
        last = s;
    }

    /** @return the menu label of the dry run of an operation */
    static String label(String operation) {
        return "Dry Run " + operation + "...";
    }
}
