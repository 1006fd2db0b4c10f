package org.stackwright.scijava;

import java.io.IOException;
import java.io.InputStream;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.nio.file.Paths;
import java.util.regex.Matcher;
import java.util.regex.Pattern;

import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;
import org.stackwright.op.Param;

/**
 * Writes the source of an operation's SciJava command class from its Params, so that a new or changed operation
 * gets a matching command without hand work:
 * after {@code mvn test-compile} and {@code mvn dependency:build-classpath -Dmdep.outputFile=target/cp.txt},
 * {@code java -cp target/classes:target/test-classes:$(cat target/cp.txt) org.stackwright.scijava.CommandSource
 * deconvolve} (run in the project folder) writes src/main/java/org/stackwright/scijava/DeconvolveCommand.java. OperationCommandTest checks that the committed
 * classes equal what this writes.
 */
public final class CommandSource {

    private CommandSource() {
    }

    public static void main(String[] args) throws IOException {
        for (String name : args) {
            Operation op = Operations.byName(name).orElseThrow(() -> new IllegalArgumentException("no operation " + name));
            Path file = Paths.get("src/main/java/org/stackwright/scijava", className(op) + ".java");
            Files.writeString(file, source(op));
            System.out.println("wrote " + file);
        }
    }

    /** @return e.g. PsfFromBeadsCommand for psf-from-beads */
    public static String className(Operation op) {
        String f = OperationCommand.fieldName(op.name());
        return Character.toUpperCase(f.charAt(0)) + f.substring(1) + "Command";
    }

    /** @return the menu label of the operation in plugins.config, without the trailing "..." */
    static String label(Operation op) throws IOException {
        String config;
        try (InputStream in = CommandSource.class.getResourceAsStream("/plugins.config")) {
            config = new String(in.readAllBytes(), StandardCharsets.UTF_8);
        }
        Matcher m = Pattern.compile("\"([^\"]+?)(\\.\\.\\.)?\", org\\.stackwright\\.imagej\\.OperationPlugin\\(\""
                + Pattern.quote(op.name()) + "\"\\)").matcher(config);
        if (!m.find()) {
            throw new IllegalStateException("plugins.config has no entry for " + op.name());
        }
        return m.group(1);
    }

    static String type(Param p) {
        return switch (p.kind()) {
            case NUMBER -> "Double";
            case INTEGER -> "Integer";
            case FLAG -> "Boolean";
            case IMAGE, OUTPUT_IMAGE -> "ImagePlus";
            case OUTPUT_FILE -> "File";
            default -> "String";
        };
    }

    /** @return the Java source of the operation's command class */
    public static String source(Operation op) throws IOException {
        boolean file = op.params().stream().anyMatch(p -> p.kind() == Param.Kind.OUTPUT_FILE);
        boolean image = op.params().stream().anyMatch(p -> p.kind() == Param.Kind.IMAGE || p.kind() == Param.Kind.OUTPUT_IMAGE);
        boolean output = op.params().stream().anyMatch(p -> p.kind() == Param.Kind.OUTPUT_IMAGE);
        String cls = className(op);
        StringBuilder sb = new StringBuilder("package org.stackwright.scijava;\n\n");
        if (file) {
            sb.append("import java.io.File;\n\n");
        }
        if (image) {
            sb.append("import ij.ImagePlus;\n\n");
        }
        if (output) {
            sb.append("import org.scijava.ItemIO;\n");
        }
        sb.append("import org.scijava.command.Command;\nimport org.scijava.plugin.Parameter;\nimport org.scijava.plugin.Plugin;\n\n");
        sb.append("/**\n * SciJava command for the {@code ").append(op.name()).append("} operation: one field per setting, named after its key (see\n")
                .append(" * {@link OperationCommand}); a null field keeps the default.\n */\n");
        sb.append("@Plugin(type = Command.class, headless = true, label = \"").append(label(op)).append("\")\n");
        sb.append("public final class ").append(cls).append(" extends OperationCommand {\n\n");
        boolean first = true;
        for (Param p : op.params()) {
            sb.append(first ? "" : "\n");
            first = false;
            if (p.kind() == Param.Kind.OUTPUT_IMAGE) {
                sb.append("    @Parameter(type = ItemIO.OUTPUT, label = \"").append(p.key()).append("\")\n");
            } else {
                sb.append("    @Parameter(persist = false, required = false, label = \"").append(p.key()).append("\")\n");
            }
            sb.append("    private ").append(type(p)).append(' ').append(OperationCommand.fieldName(p.key())).append(";\n");
        }
        sb.append("\n    public ").append(cls).append("() {\n        super(\"").append(op.name()).append("\");\n    }\n}\n");
        return sb.toString();
    }
}
