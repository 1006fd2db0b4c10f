package org.stackwright.scijava;

import java.io.File;
import java.io.IOException;
import java.io.UncheckedIOException;
import java.lang.reflect.Field;
import java.lang.reflect.Modifier;
import java.nio.charset.StandardCharsets;
import java.util.LinkedHashMap;
import java.util.Map;

import ij.ImagePlus;

import org.scijava.ItemIO;
import org.scijava.command.ContextCommand;
import org.scijava.log.LogService;
import org.scijava.plugin.Parameter;
import org.stackwright.imagej.ChannelRunner;
import org.stackwright.imagej.DoorSettings;
import org.stackwright.op.Json;
import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;
import org.stackwright.op.Param;
import org.stackwright.parallel.CancelledException;
import org.stackwright.volume.OutputFiles;
import org.stackwright.volume.TiffFiles;

/**
 * The SciJava door: the shared body of the per-operation commands, for Fiji scripts through
 * {@code CommandService.run(SomeCommand.class, true, inputs)}.
 *
 * <p>A subclass names its operation and declares one {@code @Parameter(persist = false, required = false)} field
 * per setting, named after the key in camel case ({@code immersion-index} becomes {@code immersionIndex}):
 * numbers as Double, whole numbers as Integer, words and choices as String, switches as Boolean, input images as
 * ImagePlus, output files as File, and output images as ImagePlus fields with {@code type = ItemIO.OUTPUT}. A field
 * left out keeps the operation's default (the fields start at the defaults; a number without default starts at
 * NaN, meaning "not given"). (A {@code DynamicCommand} could add the inputs from the Params without
 * fields, but {@code CommandService.run} returns no future for it, so scripts could not wait for the outputs.)
 * A test checks that the fields of every registered operation's command match its Params.
 *
 * <p>Bad input cancels the command with a message naming the key ({@code module.getCancelReason()}). Also:
 * {@code threads} (default all cores), {@code overwrite} (replace existing output files) and the output
 * {@code json} (the run record). A hyperstack is processed channel by channel and time point by time point as in
 * the ImageJ door.
 */
public abstract class OperationCommand extends ContextCommand {

    @Parameter
    private LogService log;

    @Parameter(persist = false, required = false, min = "1", description = "worker threads (default: all cores)")
    private Integer threads = Runtime.getRuntime().availableProcessors();

    @Parameter(persist = false, required = false, description = "replace output files that exist")
    private Boolean overwrite;

    @Parameter(type = ItemIO.OUTPUT, description = "the run record (JSON)")
    private String json;

    private final String operationName;

    protected OperationCommand(String operationName) {
        this.operationName = operationName;
        Operation op = lookup(operationName);
        if (op != null) {
            fillDefaults(op);
        }
    }

    /**
     * @return the operation of this name, or null when this build has none; tests override it to add operations
     *     of their own (called from the constructor: an override must not use the subclass's fields)
     */
    protected Operation lookup(String name) {
        return Operations.byName(name).orElse(null);
    }

    /**
     * Puts each setting's default into its field before the host sees the command. Why: SciJava's default-value
     * step fills every input that was not passed and is null with a number's minimum or zero, which would silently
     * replace the operation's default. A number without a default is NaN (a whole number {@link #NOT_GIVEN_INTEGER}), which means "not given".
     */
    /** Marks a whole-number setting without a default as "not given" (SciJava would fill a null with 0). */
    static final int NOT_GIVEN_INTEGER = Integer.MIN_VALUE;

    private void fillDefaults(Operation op) {
        Map<String, Field> fields = settingFields(getClass());
        for (Param p : op.params()) {
            Field f = fields.get(fieldName(p.key()));
            if (f == null) {
                continue;
            }
            try {
                if (f.get(this) != null) {
                    continue;
                }
                String d = p.defaultValue();
                Class<?> t = f.getType();
                if (t == Double.class) {
                    f.set(this, d == null ? Double.NaN : Double.valueOf(d));
                } else if (t == Integer.class) {
                    f.set(this, d == null ? NOT_GIVEN_INTEGER : Integer.valueOf(d));
                } else if (d != null && t == Boolean.class) {
                    f.set(this, Boolean.valueOf(d));
                } else if (d != null && t == String.class) {
                    f.set(this, d);
                }
            } catch (IllegalAccessException | NumberFormatException e) {
                throw new IllegalStateException("default of " + p.key() + " does not fit field " + f, e);
            }
        }
    }

    /** @return the operation name this command runs */
    public String operationName() {
        return operationName;
    }

    /** @return the run record of the last run, as JSON */
    public String json() {
        return json;
    }

    /** Converts a key to its field name: {@code immersion-index} to {@code immersionIndex}. */
    public static String fieldName(String key) {
        StringBuilder sb = new StringBuilder();
        boolean up = false;
        for (char c : key.toCharArray()) {
            if (c == '-') {
                up = true;
            } else {
                sb.append(up ? Character.toUpperCase(c) : c);
                up = false;
            }
        }
        return sb.toString();
    }

    /** @return the setting fields the subclass declares, by field name */
    public static Map<String, Field> settingFields(Class<?> commandClass) {
        Map<String, Field> m = new LinkedHashMap<>();
        for (Field f : commandClass.getDeclaredFields()) {
            if (f.isAnnotationPresent(Parameter.class) && !Modifier.isStatic(f.getModifiers())) {
                f.setAccessible(true);
                m.put(f.getName(), f);
            }
        }
        return m;
    }

    @Override
    public void run() {
        Operation op = lookup(operationName);
        if (op == null) {
            cancel("this build of Stackwright has no operation '" + operationName + "'");
            return;
        }
        try {
            Map<String, Field> fields = settingFields(getClass());
            DoorSettings s = settings(op, fields);
            int n = threads == null ? Runtime.getRuntime().availableProcessors() : threads;
            if (n < 1) {
                throw new IllegalArgumentException("threads = " + n + " is not allowed; give 1 or more");
            }
            for (Map.Entry<String, String> f : s.files().entrySet()) {
                try {
                    TiffFiles.checkWritable(new File(f.getValue()).toPath(), s.overwrite());
                } catch (IllegalArgumentException e) {
                    throw new IllegalArgumentException(f.getKey() + ": " + e.getMessage(), e);
                }
            }
            ChannelRunner.Outcome outcome = ChannelRunner.run(op, s, n,
                    (fraction, status) -> log.debug(op.name() + ": " + status),
                    w -> log.warn(op.name() + ": " + w), () -> isCanceled() || Thread.currentThread().isInterrupted());
            json = Json.write(outcome.record());
            for (Map.Entry<String, String> f : s.files().entrySet()) {
                try {
                    OutputFiles.writeText(json.getBytes(StandardCharsets.UTF_8), new File(f.getValue()).toPath(),
                            s.overwrite());
                } catch (IOException e) {
                    throw new UncheckedIOException("could not write " + f.getKey() + " " + f.getValue(), e);
                }
            }
            for (Map.Entry<String, ImagePlus> e : outcome.images().entrySet()) {
                Field f = fields.get(fieldName(e.getKey()));
                if (f != null) {
                    f.set(this, e.getValue());
                }
            }
        } catch (IllegalArgumentException e) {
            cancel(op.name() + ": " + e.getMessage());
        } catch (CancelledException e) {
            cancel(op.name() + ": cancelled; no output made");
        } catch (IllegalAccessException e) {
            throw new IllegalStateException(e);
        }
    }

    /**
     * Reads the fields into door settings. A null field keeps the default; an ImagePlus without pixels (what some
     * hosts pass for a missing image) counts as not given.
     *
     * @throws IllegalArgumentException for a field the operation has no setting for, naming it
     */
    private DoorSettings settings(Operation op, Map<String, Field> fields) throws IllegalAccessException {
        DoorSettings s = new DoorSettings();
        Map<String, Param> byField = new LinkedHashMap<>();
        for (Param p : op.params()) {
            byField.put(fieldName(p.key()), p);
        }
        for (Map.Entry<String, Field> e : fields.entrySet()) {
            Param p = byField.get(e.getKey());
            Object v = e.getValue().get(this);
            if (p == null) {
                if (v != null) {
                    throw new IllegalArgumentException("input '" + e.getKey() + "' has no setting in " + op.name());
                }
                continue;
            }
            switch (p.kind()) {
                case IMAGE -> {
                    if (v instanceof ImagePlus imp && imp.getStackSize() > 0 && imp.getProcessor() != null) {
                        s.images().put(p.key(), imp);
                    }
                }
                case OUTPUT_IMAGE -> s.outputs().add(p.key());
                case OUTPUT_FILE -> {
                    if (v != null && !v.toString().isEmpty()) {
                        s.files().put(p.key(), v.toString());
                    }
                }
                default -> {
                    boolean notGiven = v == null || (v instanceof Double d && d.isNaN())
                            || (v instanceof Integer i && i == NOT_GIVEN_INTEGER)
                            || (v instanceof String t && t.isEmpty() && p.defaultValue() == null);
                    if (!notGiven) {
                        s.text().put(p.key(), text(p, v));
                    }
                }
            }
        }
        s.overwrite(Boolean.TRUE.equals(overwrite));
        return s.outputsAsked(false);
    }

    /** A value as the text the operation parses: Double.toString gives back the same double. */
    static String text(Param p, Object v) {
        if (v instanceof Double d && p.kind() == Param.Kind.INTEGER && d == Math.rint(d) && Math.abs(d) < 1e15) {
            return Long.toString(d.longValue());
        }
        return v.toString();
    }
}
