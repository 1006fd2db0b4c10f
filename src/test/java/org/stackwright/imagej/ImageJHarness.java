package org.stackwright.imagej;

import java.awt.Dialog;
import java.awt.GraphicsEnvironment;
import java.awt.Window;
import java.io.IOException;
import java.io.OutputStream;
import java.nio.file.FileVisitResult;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.nio.file.SimpleFileVisitor;
import java.nio.file.attribute.BasicFileAttributes;
import java.util.ArrayList;
import java.util.List;
import java.util.jar.JarEntry;
import java.util.jar.JarOutputStream;

import ij.IJ;
import ij.ImageJ;
import ij.Menus;
import ij.WindowManager;
import ij.macro.Interpreter;

import org.junit.jupiter.api.Assumptions;

/**
 * Starts real ImageJ 1.x for a test class: builds a plugins folder holding {@code Stackwright_.jar} (the classes
 * and plugins.config of target/classes, as the package phase would) plus a jar for the test-only operation, sets
 * {@code plugins.dir} to it, and starts ImageJ without showing its window. Macros run through the interpreter with
 * errors captured; a watchdog closes any dialog that would otherwise wait forever for a click and reports it.
 * Needs a display (CI runs under Xvfb); without one the test is skipped.
 */
public final class ImageJHarness {

    private static ImageJ ij;
    private static final List<String> closedDialogs = new ArrayList<>();
    private static volatile boolean watching = true;

    private ImageJHarness() {
    }

    /** Skips the calling test when there is no display. */
    public static void assumeDisplay() {
        Assumptions.assumeFalse(GraphicsEnvironment.isHeadless(),
                "needs a display: run under Xvfb (xvfb-run -a mvn test), as CI does");
    }

    /** @return the project folder */
    public static Path projectDir() {
        return Paths.get(System.getProperty("stackwright.project.dir", ".")).toAbsolutePath();
    }

    /** Starts ImageJ once per JVM (every test class runs in its own JVM). */
    public static synchronized void start() throws IOException {
        assumeDisplay();
        if (ij != null) {
            return;
        }
        Path plugins = pluginsFolder();
        System.setProperty("plugins.dir", plugins.toString());
        ij = new ImageJ(ImageJ.NO_SHOW);
        Thread watchdog = new Thread(ImageJHarness::watch, "dialog watchdog");
        watchdog.setDaemon(true);
        watchdog.start();
    }

    /**
     * @return a new plugins folder under target/ holding {@code Stackwright_.jar} (the classes and plugins.config of
     *     target/classes, as the package phase would) and a jar with the menu entries of the test-only doors
     */
    static Path pluginsFolder() throws IOException {
        Path build = Paths.get(System.getProperty("stackwright.build.dir", "target")).toAbsolutePath();
        Path plugins = Files.createTempDirectory(build, "imagej-plugins-");
        jar(build.resolve("classes"), plugins.resolve("Stackwright_.jar"), null);
        StringBuilder config = new StringBuilder("Plugins>Stackwright>Test, \"Offset Test...\", "
                + "org.stackwright.imagej.TestPlugin(\"test-offset\")\n");
        List<String> names = new ArrayList<>(List.of("test-offset"));
        org.stackwright.registry.Operations.all().forEach(o -> names.add(o.name()));
        for (String name : names) {
            config.append("Plugins>Stackwright>Test, \"").append(DryRunPlugin.label(name))
                    .append("\", org.stackwright.imagej.DryRunPlugin(\"").append(name).append("\")\n");
        }
        jar(null, plugins.resolve("Stackwright_Test_.jar"), config.toString());
        return plugins;
    }

    /** Writes a jar with plugins.config at its root: the classes folder's (and its classes), or the given text. */
    private static void jar(Path classes, Path jar, String config) throws IOException {
        try (JarOutputStream out = new JarOutputStream(Files.newOutputStream(jar))) {
            if (config != null) {
                out.putNextEntry(new JarEntry("plugins.config"));
                out.write(config.getBytes(java.nio.charset.StandardCharsets.UTF_8));
                out.closeEntry();
                return;
            }
            Files.walkFileTree(classes, new SimpleFileVisitor<>() {
                @Override
                public FileVisitResult visitFile(Path file, BasicFileAttributes attrs) throws IOException {
                    out.putNextEntry(new JarEntry(classes.relativize(file).toString().replace('\\', '/')));
                    Files.copy(file, (OutputStream) out);
                    out.closeEntry();
                    return FileVisitResult.CONTINUE;
                }
            });
        }
    }

    /** Closes dialogs nobody will click (a macro error, a missing option) so a test fails instead of hanging. */
    private static void watch() {
        while (watching) {
            try {
                Thread.sleep(300);
            } catch (InterruptedException e) {
                return;
            }
            for (Window w : Window.getWindows()) {
                if (w instanceof Dialog d && d.isShowing() && d.isModal() && !allowed(d)) {
                    long since = System.nanoTime();
                    try {
                        Thread.sleep(2000);
                    } catch (InterruptedException e) {
                        return;
                    }
                    if (d.isShowing() && System.nanoTime() - since > 0) {
                        synchronized (closedDialogs) {
                            closedDialogs.add(d.getTitle());
                        }
                        d.dispose();
                    }
                }
            }
        }
    }

    private static volatile String allowedTitle;

    /** Lets a test show a dialog with this title itself (the recorder test); null to allow none. */
    public static void allowDialog(String title) {
        allowedTitle = title;
    }

    private static boolean allowed(Dialog d) {
        String t = allowedTitle;
        return t != null && t.equals(d.getTitle());
    }

    /** @return the titles of dialogs the watchdog had to close since the last call */
    public static List<String> closedDialogs() {
        synchronized (closedDialogs) {
            List<String> l = List.copyOf(closedDialogs);
            closedDialogs.clear();
            return l;
        }
    }

    /**
     * Runs a macro in this thread with errors captured.
     *
     * @return the error message, or null when the macro ran through
     */
    public static String runMacro(String code, String arg) {
        IJ.redirectErrorMessages();
        Interpreter interp = new Interpreter();
        interp.setIgnoreErrors(true);
        interp.run(code, arg);
        String err = interp.getErrorMessage();
        List<String> closed = closedDialogs();
        if (err == null && !closed.isEmpty()) {
            err = "a dialog waited for a click: " + closed;
        }
        return err;
    }

    /** Closes all images and non-image windows a test left open. */
    public static void closeAll() {
        Interpreter.batchMode = false;
        for (int id : WindowManager.getIDList() == null ? new int[0] : WindowManager.getIDList()) {
            ij.ImagePlus imp = WindowManager.getImage(id);
            if (imp != null) {
                imp.changes = false;
                imp.close();
            }
        }
    }

    /** @return true when ImageJ knows this command (from a plugins.config) */
    public static boolean hasCommand(String label) {
        return Menus.getCommands().containsKey(label);
    }
}
