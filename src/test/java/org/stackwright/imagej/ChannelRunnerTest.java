package org.stackwright.imagej;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.ArrayList;
import java.util.List;
import java.util.Map;

import ij.ImagePlus;

import org.junit.jupiter.api.Test;
import org.stackwright.op.Param;
import org.stackwright.parallel.CancelledException;

/** The hyperstack rule without a display: parts, per-channel images, assembly, and what is refused. */
class ChannelRunnerTest {

    private static DoorSettings settings(ImagePlus input, ImagePlus psf, String wavelength) {
        DoorSettings s = new DoorSettings();
        s.images().put("input", input);
        if (psf != null) {
            s.images().put("psf", psf);
        }
        s.text().put("wavelength", wavelength);
        s.text().put("iterations", "2");
        s.outputs().add("output");
        return s;
    }

    @Test
    void timePointsInTurnChannelsWithTheirOwnValues() {
        ImagePlus in = ImageJDoorTest.hyperstack("in", 2, 3, 2);
        List<String> status = new ArrayList<>();
        ChannelRunner.Outcome o = ChannelRunner.run(new OffsetOperation(), settings(in, null, "400,700"), 1,
                (f, s) -> status.add(s), w -> { }, () -> false);
        assertEquals(4, o.parts().size());
        assertEquals(List.of(1, 2, 1, 2), o.parts().stream().map(ChannelRunner.Part::channel).toList());
        assertEquals(List.of(1, 1, 2, 2), o.parts().stream().map(ChannelRunner.Part::frame).toList());
        assertEquals("700", o.parts().get(3).values().raw("wavelength"));
        ImagePlus out = o.images().get("output");
        assertEquals("in-test-offset", out.getTitle());
        assertArrayEquals(in.getDimensions(), out.getDimensions());
        assertEquals(2.5, out.getCalibration().frameInterval, 0);
        assertTrue(status.get(status.size() - 1).startsWith("channel 2, time 2: "), status.toString());
        Map<String, Object> record = o.record();
        assertEquals(4, ((List<?>) record.get("parts")).size());
    }

    @Test
    void imagesThatDoNotMatchTheInputAreRefusedByName() {
        ImagePlus in = ImageJDoorTest.hyperstack("in", 2, 3, 1);
        ImagePlus psf = ImageJDoorTest.hyperstack("psf3", 3, 1, 1);
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> ChannelRunner.run(
                new OffsetOperation(), settings(in, psf, "500"), 1, (f, s) -> { }, w -> { }, () -> false));
        assertTrue(e.getMessage().startsWith("psf = 'psf3' has 3 channels but input has 2"), e.getMessage());
    }

    @Test
    void everyPartIsCheckedBeforeTheFirstRuns() {
        ImagePlus in = ImageJDoorTest.hyperstack("in", 2, 1, 1);
        List<String> status = new ArrayList<>();
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> ChannelRunner.run(
                new OffsetOperation(), settings(in, null, "500,5"), 1, (f, s) -> status.add(s), w -> { }, () -> false));
        assertTrue(e.getMessage().startsWith("wavelength = 5 is out of range"), e.getMessage());
        assertTrue(status.isEmpty(), "nothing ran: " + status);
    }

    @Test
    void cancelStopsBeforeAnyOutput() {
        ImagePlus in = ImageJDoorTest.hyperstack("in", 1, 2, 3);
        assertThrows(CancelledException.class, () -> ChannelRunner.run(new OffsetOperation(),
                settings(in, null, "500"), 1, (f, s) -> { }, w -> { }, () -> true));
    }

    @Test
    void operationsWithoutAnInputImageRunOnce() {
        assertEquals(null, ChannelRunner.mainInput(new org.stackwright.simulate.SimulateOperation()));
        assertEquals("input", ChannelRunner.mainInput(new OffsetOperation()));
        assertTrue(new OffsetOperation().params().stream().anyMatch(p -> p.kind() == Param.Kind.OUTPUT_FILE));
    }
}
