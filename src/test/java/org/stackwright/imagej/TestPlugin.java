package org.stackwright.imagej;

import org.stackwright.op.Operation;

/** The ImageJ door for the test-only operation (a tiny subclass, as a new door class would be). */
public class TestPlugin extends OperationPlugin {

    @Override
    protected Operation lookup(String name) {
        return name.equals("test-offset") ? new OffsetOperation() : super.lookup(name);
    }
}
