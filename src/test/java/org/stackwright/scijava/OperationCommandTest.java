package org.stackwright.scijava;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotNull;
import static org.junit.jupiter.api.Assertions.assertNull;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.lang.reflect.Field;
import java.util.HashMap;
import java.util.HashSet;
import java.util.LinkedHashMap;
import java.util.Map;
import java.util.Set;

import ij.ImagePlus;

import org.junit.jupiter.api.AfterAll;
import org.junit.jupiter.api.BeforeAll;
import org.junit.jupiter.api.Test;
import org.scijava.Context;
import org.scijava.ItemIO;
import org.scijava.plugin.Parameter;
import org.scijava.command.Command;
import org.scijava.command.CommandInfo;
import org.scijava.command.CommandModule;
import org.scijava.command.CommandService;
import org.stackwright.op.Operation;
import org.stackwright.registry.Operations;
import org.stackwright.op.Param;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.testing.ExpectedOperations;

/** The SciJava door, headless: indexing by the annotation processor, inputs from Params, validation, output. */
class OperationCommandTest {

    private static Context context;
    private static CommandService commands;

    @BeforeAll
    static void start() {
        context = new Context(CommandService.class);
        commands = context.getService(CommandService.class);
    }

    @AfterAll
    static void stop() {
        context.dispose();
    }

    private static Map<String, Class<?>> indexed() {
        Map<String, Class<?>> byOperation = new LinkedHashMap<>();
        for (CommandInfo info : commands.getCommandsOfType(Command.class)) {
            if (!info.getClassName().startsWith("org.stackwright.scijava.")) {
                continue;
            }
            try {
                Class<?> c = info.loadClass();
                OperationCommand cmd = (OperationCommand) c.getDeclaredConstructor().newInstance();
                byOperation.put(cmd.operationName(), c);
                assertNull(info.getMenuPath() == null || info.getMenuPath().isEmpty() ? null : info.getMenuPath(),
                        c + " must have no menu path (menus come from plugins.config)");
                assertTrue(info.canRunHeadless(), c + " must run headless");
            } catch (ReflectiveOperationException | org.scijava.InstantiableException e) {
                throw new AssertionError(e);
            }
        }
        return byOperation;
    }

    @Test
    void everyRegisteredOperationHasAnIndexedCommandAndEveryCommandItsOperation() {
        Map<String, Class<?>> byOperation = indexed();
        for (Operation op : Operations.all()) {
            assertTrue(byOperation.containsKey(op.name()), "no SciJava command for operation " + op.name());
        }
        Set<String> registered = new HashSet<>();
        Operations.all().forEach(o -> registered.add(o.name()));
        for (String name : byOperation.keySet()) {
            assertTrue(registered.contains(name) || ExpectedOperations.tolerated(name),
                    "SciJava command for '" + name + "' but no such operation is registered");
        }
    }

    /** The fields of each registered operation's command match its Params one to one, in name, type and io. */
    @Test
    void fieldsMatchTheParams() {
        Map<String, Class<?>> byOperation = indexed();
        for (Operation op : Operations.all()) {
            Class<?> c = byOperation.get(op.name());
            Map<String, Field> fields = OperationCommand.settingFields(c);
            Set<String> expected = new HashSet<>();
            for (Param p : op.params()) {
                String name = OperationCommand.fieldName(p.key());
                expected.add(name);
                Field f = fields.get(name);
                assertNotNull(f, c.getSimpleName() + " has no field " + name + " for setting " + p.key());
                Parameter a = f.getAnnotation(Parameter.class);
                assertEquals(typeOf(p), f.getType(), c.getSimpleName() + "." + name + " type");
                if (p.kind() == Param.Kind.OUTPUT_IMAGE) {
                    assertEquals(ItemIO.OUTPUT, a.type(), name + " must be an output");
                } else {
                    assertEquals(ItemIO.INPUT, a.type(), name + " must be an input");
                    assertFalse(a.persist(), name + " must not persist");
                    assertFalse(a.required(), name + " must be optional (the operation checks what is required)");
                }
            }
            assertEquals(expected, fields.keySet(), c.getSimpleName() + " fields against the Params of " + op.name());
        }
    }

    /** Hyperstacks through the SciJava door: per-channel PSF, dimensions, calibration, the input untouched. */
    @Test
    void hyperstackWithAPsfPerChannel() throws Exception {
        ImagePlus in = org.stackwright.imagej.ImageJDoorTestData.hyperstack("cells", 2, 3, 2);
        ImagePlus psf = org.stackwright.imagej.ImageJDoorTestData.hyperstack("psf", 2, 1, 1);
        float before = ((float[]) in.getStack().getPixels(1))[5];
        Map<String, Object> inputs = new HashMap<>();
        inputs.put("input", in);
        inputs.put("psf", psf);
        inputs.put("wavelength", 600.0);
        inputs.put("threads", 1);
        CommandModule module = commands.run(new CommandInfo(OffsetCommand.class), true, inputs).get();
        assertFalse(module.isCanceled(), () -> module.getCancelReason());
        ImagePlus out = (ImagePlus) module.getOutput("output");
        assertArrayEquals(in.getDimensions(), out.getDimensions());
        assertEquals(0.09, out.getCalibration().pixelWidth, 0);
        assertEquals(2.5, out.getCalibration().frameInterval, 0);
        double psfSum2 = 0;
        for (float f : (float[]) psf.getStack().getPixels(psf.getStackIndex(2, 1, 1))) {
            psfSum2 += f;
        }
        int idx = in.getStackIndex(2, 2, 2);
        float a = ((float[]) in.getStack().getPixels(idx))[7];
        assertEquals((float) (a + 600 + psfSum2), ((float[]) out.getStack().getPixels(out.getStackIndex(2, 2, 2)))[7]);
        assertEquals(before, ((float[]) in.getStack().getPixels(1))[5], "input unchanged");
        assertTrue(((String) module.getOutput("json")).contains("\"parts\""));

        inputs.put("wavelength", 5.0);
        CommandModule bad = commands.run(new CommandInfo(OffsetCommand.class), true, inputs).get();
        assertTrue(bad.isCanceled());
        assertTrue(bad.getCancelReason().startsWith("test-offset: wavelength = 5.0 is out of range"), bad.getCancelReason());
    }

    /** The committed command classes are what {@link CommandSource} writes from the Params. */
    @Test
    void committedCommandClassesAreWhatTheGeneratorWrites() throws Exception {
        for (Operation op : Operations.all()) {
            java.nio.file.Path file = java.nio.file.Paths.get(System.getProperty("stackwright.project.dir", "."),
                    "src/main/java/org/stackwright/scijava", CommandSource.className(op) + ".java");
            assertEquals(CommandSource.source(op), java.nio.file.Files.readString(file),
                    file + " differs from the Params; regenerate it with CommandSource " + op.name());
        }
    }

    private static Class<?> typeOf(Param p) {
        return switch (p.kind()) {
            case NUMBER -> Double.class;
            case INTEGER -> Integer.class;
            case FLAG -> Boolean.class;
            case IMAGE, OUTPUT_IMAGE -> ImagePlus.class;
            case OUTPUT_FILE -> java.io.File.class;
            default -> String.class;
        };
    }

    @Test
    void sameSettingsGiveTheSamePixelsAsTheOperationItself() throws Exception {
        Map<String, Object> in = new HashMap<>();
        in.put("size", "24x20x5");
        in.put("pixel", 0.1);
        in.put("seed", 7);
        in.put("specimen", "beads");
        in.put("beads", 5);
        in.put("threads", 1);
        CommandModule module = commands.run(SimulateCommand.class, true, in).get();
        assertNotNull(module);
        assertFalse(module.isCanceled(), () -> "cancelled: " + module.getCancelReason());
        ImagePlus out = (ImagePlus) module.getOutput("output");
        assertNotNull(out);
        assertEquals("simulate", out.getTitle());

        Operation op = Operations.byName("simulate").orElseThrow();
        Values v = Values.parse("simulate", op.params(),
                Map.of("size", "24x20x5", "pixel", "0.1", "seed", "7", "specimen", "beads", "beads", "5"));
        ImagePlus direct = op.run(v, RunContext.quiet(1)).images().get("output");
        assertEquals(direct.getStackSize(), out.getStackSize());
        for (int z = 1; z <= out.getStackSize(); z++) {
            assertArrayEquals((float[]) direct.getStack().getPixels(z), (float[]) out.getStack().getPixels(z));
        }
        assertEquals(0.1, out.getCalibration().pixelWidth, 1e-12);
        String json = (String) module.getOutput("json");
        assertTrue(json.contains("\"operation\": \"simulate\""), json);
    }

    @Test
    void badValueCancelsWithAMessageNamingTheKey() throws Exception {
        CommandModule module = commands.run(SimulateCommand.class, true,
                Map.of("size", "8x8x3", "specimen", "stars")).get();
        assertTrue(module.isCanceled());
        assertTrue(module.getCancelReason().contains("specimen") && module.getCancelReason().contains("stars"),
                module.getCancelReason());
        CommandModule range = commands.run(SimulateCommand.class, true, Map.of("size", "8x8x3", "na", 5.0)).get();
        assertTrue(range.isCanceled());
        assertTrue(range.getCancelReason().contains("na = 5.0"), range.getCancelReason());
    }
}
