package org.stackwright.imagej;

import java.awt.AWTEvent;
import java.awt.Component;
import java.awt.Container;
import java.awt.Dialog;
import java.awt.GraphicsEnvironment;
import java.awt.Label;
import java.awt.TextArea;
import java.awt.Toolkit;
import java.awt.event.WindowEvent;

import ij.IJ;
import ij.Prefs;

/**
 * ImageJ run with no one at the screen: started as {@code ImageJ -batch macro.ijm} (no ImageJ window, a macro
 * given on the command line), or in a headless JVM. There, an error must end the run with its message on stderr
 * and a non-zero exit code: ImageJ's own error window would wait for a click that never comes (under a virtual
 * display the process would hang forever), and ImageJ ends a {@code -batch} run with exit code 0 whatever
 * happened. Once a Stackwright command has run unattended, the same holds for ImageJ's own error windows (a
 * "Macro Error" later in the macro): {@link #guard} ends the process with their text.
 */
final class Unattended {

    /** Exit code for a refused input, as on the command line. */
    static final int BAD_INPUT = 2;
    /** Exit code for a failure or a cancel, as on the command line. */
    static final int FAILED = 1;

    private Unattended() {
    }

    private static boolean guarded;

    /**
     * When unattended: from now on, a modal window that opens (ImageJ's "Macro Error" and any other message that
     * would wait for a click) ends the process with its title and text on stderr and exit code 1.
     */
    static synchronized void guard() {
        if (guarded || !active() || GraphicsEnvironment.isHeadless()) {
            return;
        }
        guarded = true;
        Toolkit.getDefaultToolkit().addAWTEventListener(e -> {
            if (e.getID() == WindowEvent.WINDOW_OPENED && e.getSource() instanceof Dialog d && d.isModal()) {
                String text = text(d).trim();
                System.err.println("ImageJ " + d.getTitle() + ": " + (text.isEmpty() ? "(no text)" : text));
                System.err.flush();
                new Thread(() -> System.exit(FAILED), "unattended error").start();
            }
        }, AWTEvent.WINDOW_EVENT_MASK);
    }

    /** @return the text of a window's labels and text areas (ImageJ's multi-line labels by their lines) */
    static String text(Container c) {
        StringBuilder sb = new StringBuilder();
        for (Component k : c.getComponents()) {
            if (k instanceof Label l) {
                sb.append(l.getText()).append('\n');
            } else if (k instanceof TextArea t) {
                sb.append(t.getText()).append('\n');
            } else if (k instanceof ij.gui.MultiLineLabel m) {
                sb.append(lines(m)).append('\n');
            } else if (k instanceof Container inner) {
                sb.append(text(inner));
            }
        }
        return sb.toString();
    }

    /** ImageJ's MultiLineLabel keeps its lines in a field without a getter. */
    private static String lines(ij.gui.MultiLineLabel m) {
        try {
            java.lang.reflect.Field f = ij.gui.MultiLineLabel.class.getDeclaredField("lines");
            f.setAccessible(true);
            return String.join("\n", (String[]) f.get(m));
        } catch (ReflectiveOperationException | RuntimeException e) {
            return "";
        }
    }

    /** @return true when no one can answer a dialog: ImageJ started with -batch, or a headless JVM */
    static boolean active() {
        return IJ.getInstance() == null && (Prefs.commandLineMacro() || GraphicsEnvironment.isHeadless());
    }

    /**
     * Ends the run: writes "title: message" to stderr and exits with the code.
     *
     * @param code {@link #BAD_INPUT} or {@link #FAILED}
     */
    static void fail(String title, String message, int code) {
        System.err.println(title + ": " + message);
        System.err.flush();
        System.out.flush();
        System.exit(code);
    }
}
