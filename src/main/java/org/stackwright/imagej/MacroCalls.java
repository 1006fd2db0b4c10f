package org.stackwright.imagej;

/**
 * Functions a macro reaches with ImageJ's {@code call("org.stackwright.imagej.MacroCalls.NAME", ...)} (public,
 * static, text in and out, as {@code call} requires).
 */
public final class MacroCalls {

    private MacroCalls() {
    }

    /**
     * Stops the macro with an error: with no one at the screen (ImageJ -batch) the message goes to stderr and the
     * process ends with exit code 1; otherwise ImageJ's error window shows it and the macro stops. The bundled
     * macros use it where ImageJ's own {@code exit(message)} would end a {@code -batch} run with exit code 0.
     *
     * @return never returns normally in a macro
     */
    public static String fail(String message) {
        OperationPlugin.error("Stackwright macro", message, Unattended.FAILED);
        return "";
    }
}
