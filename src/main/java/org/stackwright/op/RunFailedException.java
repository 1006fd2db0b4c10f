package org.stackwright.op;

/**
 * A run that could not give a trustworthy result although its input was acceptable: a solver whose numbers left
 * the finite range, an output that could not be written completely. Doors report the message as it is (exit code
 * 1 on the command line) and write no output; the message says what happened and what to try.
 */
public class RunFailedException extends RuntimeException {

    private static final long serialVersionUID = 1L;

    public RunFailedException(String message) {
        super(message);
    }

    public RunFailedException(String message, Throwable cause) {
        super(message, cause);
    }
}
