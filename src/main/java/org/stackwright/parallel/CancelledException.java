package org.stackwright.parallel;

/** Thrown when a run is cancelled by the user (Esc, interrupt, SIGINT) or by a listener. */
public class CancelledException extends RuntimeException {
    private static final long serialVersionUID = 1L;

    public CancelledException(String message) {
        super(message);
    }
}
