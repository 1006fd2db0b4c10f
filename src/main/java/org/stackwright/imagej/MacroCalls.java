package org.stackwright.imagej;

/**
 * Functions a macro reaches with ImageJ's {@code call("org.stackwright.imagej.MacroCalls.NAME", ...)} (public,
 * static, text in and out, as {@code call} requires).
 */
public final class MacroCalls {

    private MacroCalls() {
    }

    /**
     * With no one at the screen (ImageJ -batch): from here on, an error window of ImageJ itself (a "Macro Error")
     * ends the process with its text on stderr and exit code 1 instead of waiting for a click (see
     * {@link Unattended#guard}). Does nothing when a person runs the macro. A Stackwright command does the same on
     * its first run; a macro that calls this first is covered from its first line.
     *
     * @return ""
     */
    public static String guard() {
        Unattended.guard();
        return "";
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
